import { describe, expect, it } from 'vitest';
import { coherentGain, createWindow, equivalentNoiseBandwidth, type WindowKind, type WindowSymmetry } from '../src/spectrum/windows.js';
import { createRealFftPlan } from '../src/fft/real-fft.js';
import { expectAllClose } from './helpers/approx.js';
import { loadFixture } from './helpers/fixtures.js';
import { refusedBy } from './helpers/refused.js';

interface WindowFixture {
  windows: { kind: WindowKind; length: number; symmetry: WindowSymmetry; values: number[] }[];
}

describe('windows against scipy.signal.get_window (fixtures)', () => {
  for (const c of loadFixture<WindowFixture>('windows.json').windows) {
    it(`${c.kind} M = ${c.length} ${c.symmetry}`, () => {
      // source: scipy.signal.get_window(name, M, fftbins = symmetry === 'periodic');
      // scipy sums the same cosines (from linspace angles), so agreement is within a few ε.
      expectAllClose(createWindow(c.kind, c.length, c.symmetry), c.values, 0, 1e-14);
    });
  }
});

describe('coherent gain and ENBW (Harris 1978)', () => {
  const m = 4096;
  // Values: F. J. Harris, Proc. IEEE 66(1), 1978, table I. Rectangular and Hann are exact by
  // formula (CG = 1 and 0.5, ENBW = 1 and 1.5 for a periodic window); Hamming's 0.54 and 1.36
  // are from memory and rounded to two decimals in the table, hence the 0.005 tolerance.
  const cases: [WindowKind, number, number, number][] = [
    ['rectangular', 1, 1, 1e-12],
    ['hann', 0.5, 1.5, 1e-12],
    ['hamming', 0.54, 1.36, 5e-3],
    ['blackman', 0.42, 1.73, 5e-3], // Harris 1978 table I: CG 0.42, ENBW 1.73 (from memory)
    ['blackman-harris', 0.36, 2.0, 5e-3], // Harris 1978 table I, 4-term −92 dB: CG 0.36, ENBW 2.00 (from memory)
  ];
  for (const [kind, cg, enbw, tol] of cases) {
    it(`${kind}: CG ${cg}, ENBW ${enbw} bins`, () => {
      const w = createWindow(kind, m, 'periodic');
      expect(Math.abs(coherentGain(w) - cg)).toBeLessThanOrEqual(tol);
      expect(Math.abs(equivalentNoiseBandwidth(w) - enbw)).toBeLessThanOrEqual(tol);
    });
  }

  /** Highest side lobe in dB relative to the main lobe, from a 64× zero-padded spectrum. */
  function highestSideLobeDb(kind: WindowKind): number {
    const m = 64;
    const n = m * 64;
    const w = createWindow(kind, m, 'symmetric');
    const plan = createRealFftPlan(n);
    const buf = new Float64Array(n);
    buf.set(w);
    const re = new Float64Array(plan.bins);
    const im = new Float64Array(plan.bins);
    plan.forward(buf, re, im);
    const mag = re.map((r, k) => Math.hypot(r, im[k] as number));
    let k = 1;
    while (k < mag.length - 1 && (mag[k + 1] as number) < (mag[k] as number)) k++; // walk down the main lobe
    let side = 0;
    for (let j = k; j < mag.length; j++) side = Math.max(side, mag[j] as number);
    return 20 * Math.log10(side / (mag[0] as number));
  }
  // source: Harris 1978 table I, highest side lobe (from memory): rectangular −13, Hann −31.5 (−32),
  // Hamming −43, Blackman −58, 4-term Blackman-Harris −92 dB. Tolerance 1.5 dB: the table rounds,
  // and a finite M = 64 shifts side lobes by a few tenths of a dB.
  const sideLobes: [WindowKind, number][] = [['rectangular', -13.3], ['hann', -31.5], ['hamming', -43], ['blackman', -58], ['blackman-harris', -92]];
  for (const [kind, expected] of sideLobes) {
    it(`${kind} highest side lobe ≈ ${expected} dB`, () => {
      expect(Math.abs(highestSideLobeDb(kind) - expected)).toBeLessThan(1.5);
    });
  }

  it('rejects a bad length naming the function', () => {
    expect(() => createWindow('hann', 0)).toThrow(refusedBy('createWindow'));
  });
});
