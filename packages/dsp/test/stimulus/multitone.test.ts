import { describe, expect, it } from 'vitest';
import { generateStimulus, schroederPhases, toneFrequencies } from '../../src/stimulus/index.js';
import { hasPythonScipy, runPython } from '../io/python-oracle.js';
import { multitoneSpec, peak, rms } from './spec-fixtures.js';

describe('Schroeder multitone (M. R. Schroeder, IEEE Trans. Inf. Theory 16(1), 1970)', () => {
  it('uses φ_k = −π·k(k−1)/K', () => {
    // K = 4: φ = 0, −π/2, −3π/2, −3π by the formula.
    expect(Array.from(schroederPhases(4))).toEqual([-0, -Math.PI / 2, (-3 * Math.PI) / 2, -3 * Math.PI]);
  });

  it('has a lower crest factor than the same tones with random phases (20 seeds)', () => {
    // 64 harmonics of 100 Hz over 0.1 s: whole periods, so the RMS is exact.
    const schroeder = generateStimulus(multitoneSpec()).channels[0] ?? new Float64Array();
    const cfSchroeder = peak(schroeder) / rms(schroeder);
    // Schroeder reports peak factors close to a single sine's √2 for flat spectra (from memory);
    // 64 tones stay below 2 (6 dB).
    expect(cfSchroeder).toBeLessThan(2);
    let lowestRandom = Number.POSITIVE_INFINITY;
    for (let seed = 0; seed < 20; seed++) {
      const x = generateStimulus(multitoneSpec({ phases: 'random', seed })).channels[0] ?? new Float64Array();
      lowestRandom = Math.min(lowestRandom, peak(x) / rms(x));
    }
    expect(cfSchroeder).toBeLessThan(lowestRandom);
  });

  it('has the RMS of a sine at the same level (AES17 dBFS)', () => {
    const x = generateStimulus(multitoneSpec({ levelDbfs: -20 })).channels[0] ?? new Float64Array();
    expect(rms(x)).toBeCloseTo(10 ** (-20 / 20) / Math.SQRT2, 12);
  });

  it.skipIf(!hasPythonScipy())('puts equal energy at exactly the requested tones (numpy rfft)', () => {
    const spec = multitoneSpec({ from: undefined, to: undefined, count: undefined, frequencies: [300, 1200, 5000], levelDbfs: -10 });
    const x = generateStimulus(spec).channels[0] ?? new Float64Array();
    const r = runPython(
      `X = np.abs(np.fft.rfft(IN["x"])) * 2 / len(IN["x"])
top = np.argsort(X)[-4:][::-1]
print(json.dumps(dict(bins=sorted(int(b) * 10 for b in top[:3]), amps=[float(X[b]) for b in top[:3]], fourth=float(X[top[3]]))))`,
      { x },
    ) as { bins: number[]; amps: number[]; fourth: number };
    expect(r.bins).toEqual([300, 1200, 5000]); // 0.1 s → 10 Hz bins
    for (const a of r.amps) expect(a).toBeCloseTo(10 ** (-10 / 20) / Math.sqrt(3), 9);
    expect(r.fourth).toBeLessThan(1e-9);
  });

  it('spaces tones on a log or linear axis', () => {
    expect(Array.from(toneFrequencies(100, 10000, 3, 'log'))).toEqual([100, 1000, 10000].map((f, i) => (i === 1 ? 100 * 100 ** 0.5 : f)));
    expect(Array.from(toneFrequencies(100, 300, 3, 'linear'))).toEqual([100, 200, 300]);
  });

  it('is deterministic for random phases with a seed', () => {
    const a = generateStimulus(multitoneSpec({ phases: 'random', seed: 5 })).channels[0];
    const b = generateStimulus(multitoneSpec({ phases: 'random', seed: 5 })).channels[0];
    const c = generateStimulus(multitoneSpec({ phases: 'random', seed: 6 })).channels[0];
    expect(Array.from(a ?? [])).toEqual(Array.from(b ?? []));
    expect(Array.from(a ?? [])).not.toEqual(Array.from(c ?? []));
  });
});
