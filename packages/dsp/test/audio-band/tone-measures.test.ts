import { describe, expect, it } from 'vitest';
import { aWeightingGain } from '../../src/measures/a-weighting.js';
import type { HarmonicFit } from '../../src/measures/sine-fit.js';
import { computeToneMeasures, dynamicRangeDb, inBandInclusive } from '../../src/measures/tone-measures.js';
import { refusedBy } from '../helpers/refused.js';

/** A fit with the given (harmonic, amplitude) pairs; phases do not matter to the measures. */
function fitOf(f0: number, amplitudes: [number, number][]): HarmonicFit {
  return { fundamentalHz: f0, dc: 0, components: amplitudes.map(([h, a]) => ({ harmonic: h, frequencyHz: h * f0, amplitude: a, a, b: 0 })) };
}
const BAND: [number, number] = [20, 20000];

describe('tone measures (definitions of distortion.ts; AES17-2020 §6.3; IEEE Std 1241-2010 §4.5–4.6)', () => {
  it('computes THD, THD+N, SNR, SINAD and ENOB from their closed forms', () => {
    // A1 = 1, A3 = 0.01 (1 %), in-band noise N = 1e-10.
    const r = computeToneMeasures(fitOf(1000, [[1, 1], [2, 0], [3, 0.01]]), { power: 1e-10, powerA: 5e-11 }, BAND);
    const t = r.tone!;
    const p1 = 0.5;
    const h = 0.01 ** 2 / 2;
    // THD = 100·√(ΣA_k²)/A1 = 1 %, −40 dB.
    expect(t.thdPercent).toBeCloseTo(1, 12);
    expect(t.thdDb).toBeCloseTo(-40, 10);
    // THD+N relative to the total in-band signal: 10·log10((N + H)/(P1 + N + H)).
    expect(t.thdnDb).toBeCloseTo(10 * Math.log10((1e-10 + h) / (p1 + 1e-10 + h)), 10);
    // A-weighted: the 3 kHz harmonic and the noise weighted, P1 and the total not (AES17).
    const hA = h * aWeightingGain(3000) ** 2;
    expect(t.thdnDbA).toBeCloseTo(10 * Math.log10((5e-11 + hA) / (p1 + 1e-10 + h)), 10);
    expect(t.snrDb).toBeCloseTo(10 * Math.log10(p1 / 1e-10), 10);
    expect(t.snrDbA).toBeCloseTo(10 * Math.log10(p1 / 5e-11), 10);
    expect(t.sinadDb).toBeCloseTo(10 * Math.log10(p1 / (1e-10 + h)), 10);
    expect(t.enob).toBeCloseTo((t.sinadDb - 1.76) / 6.02, 12);
    expect(r.noiseFloorDbfs).toBeCloseTo(-96.98970004336019, 10); // 10·log10(2·1e-10)
    expect(r.warnings).toEqual([]);
  });

  it('weights only the noise: a 100 Hz tone keeps its unweighted power in SNR_A', () => {
    // Noise at −100 dBFS in band, A-weighted −102 dBFS; tone 100 Hz at −1 dBFS. A weighting of
    // the fundamental too (the old mask check) would lower SNR_A by A(100 Hz) = −19.1 dB
    // (IEC 61672-1 table 3): 101 dB instead of 82 dB.
    const n = 10 ** -10 / 2;
    const nA = 10 ** -10.2 / 2;
    const t = computeToneMeasures(fitOf(100, [[1, 10 ** (-1 / 20)]]), { power: n, powerA: nA }, BAND).tone!;
    expect(t.snrDbA).toBeCloseTo(-1 + 102, 9);
    expect(t.snrDb).toBeCloseTo(-1 + 100, 9);
  });

  it('band edges are inclusive and stable to 1e-6 relative', () => {
    expect(inBandInclusive(20000 * (1 + 5e-7), BAND)).toBe(true);
    expect(inBandInclusive(20000 * (1 - 1e-12), BAND)).toBe(true);
    expect(inBandInclusive(20 * (1 - 5e-7), BAND)).toBe(true);
    expect(inBandInclusive(20000 * (1 + 2e-6), BAND)).toBe(false);
    const lo = computeToneMeasures(fitOf(20000 * (1 - 1e-12), [[1, 1]]), { power: 1e-15, powerA: 1e-15 }, BAND).tone!;
    const hi = computeToneMeasures(fitOf(20000 * (1 + 1e-12), [[1, 1]]), { power: 1e-15, powerA: 1e-15 }, BAND).tone!;
    expect(lo.thdnDb).toBe(hi.thdnDb);
  });

  it('THD is null with a warning when no harmonic lies below Nyquist (not 0 %)', () => {
    const r = computeToneMeasures(fitOf(20000, [[1, 1]]), { power: 1e-15, powerA: 1e-15 }, BAND);
    expect(r.tone?.thdPercent).toBeNull();
    expect(r.tone?.thdDb).toBeNull();
    expect(r.tone?.thdnDb).toBeCloseTo(10 * Math.log10(1e-15 / (0.5 + 1e-15)), 10);
    expect(r.warnings.join(' ')).toMatch(/THD is not reported: no harmonic/);
  });

  it('a fundamental outside the band gives no tone measures, a warning, and still a noise floor', () => {
    const r = computeToneMeasures(fitOf(25000, [[1, 1]]), { power: 1e-12, powerA: 1e-12 }, BAND);
    expect(r.tone).toBeNull();
    expect(r.warnings.join(' ')).toMatch(/25000\.00 Hz lies outside the measurement band 20–20000 Hz/);
    expect(r.noiseFloorDbfs).toBeCloseTo(10 * Math.log10(2e-12), 10);
  });

  it('no fit and no noise: everything null, with reasons', () => {
    const r = computeToneMeasures(null, { power: 0, powerA: 0 }, BAND);
    expect(r.tone).toBeNull();
    expect(r.noiseFloorDbfs).toBeNull();
    expect(r.noiseFloorDbfsA).toBeNull();
    expect(r.warnings).toHaveLength(2);
  });

  it('dynamic range: −THD+N_A − L_total = −10·log10(2·(N_A + H_A)) for a −60 dBFS tone (AES17-2020 §6.4.1)', () => {
    const nA = 10 ** -9.62 / 2; // A-weighted noise at −96.2 dBFS
    const r = computeToneMeasures(fitOf(997, [[1, 1e-3], [2, 1e-7]]), { power: nA * 1.2, powerA: nA }, BAND);
    const hA = (1e-14 / 2) * aWeightingGain(1994) ** 2;
    expect(dynamicRangeDb(r)).toBeCloseTo(-10 * Math.log10(2 * (nA + hA)), 9);
    // Not a −60 dBFS tone: no dynamic range.
    expect(dynamicRangeDb(computeToneMeasures(fitOf(997, [[1, 0.5]]), { power: nA, powerA: nA }, BAND))).toBeNull();
  });

  it('rejects a bad band or negative noise with the function name', () => {
    expect(() => computeToneMeasures(null, { power: -1, powerA: 0 }, BAND)).toThrow(refusedBy('computeToneMeasures'));
    expect(() => computeToneMeasures(null, { power: 0, powerA: 0 }, [100, 10])).toThrow(refusedBy('computeToneMeasures'));
  });
});
