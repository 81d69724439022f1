import { describe, expect, it } from 'vitest';
import { createRealFftPlan } from '../src/fft/real-fft.js';
import { createWindow } from '../src/spectrum/windows.js';
import { extractZeroPhase, placeZeroPhase } from '../src/spectrum/zero-phase.js';
import { maxAbs } from './helpers/approx.js';
import { refusedBy } from './helpers/refused.js';

function spectrumOf(buffer: Float64Array): { re: Float64Array; im: Float64Array } {
  const plan = createRealFftPlan(buffer.length);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  plan.forward(buffer, re, im);
  return { re, im };
}

describe('zero-phase placement', () => {
  it('maps M = 401 into N = 512 as REFERENCES.md states', () => {
    const frame = Float64Array.from({ length: 401 }, (_, i) => i + 1); // sample i holds i + 1
    const out = placeZeroPhase(frame, new Float64Array(512));
    // source: REFERENCES.md "zero-phase buffer placement": samples 200…400 at 0…200, 0…199 at 312…511
    expect(out[0]).toBe(201);
    expect(out[200]).toBe(401);
    expect(maxAbs(out.subarray(201, 312))).toBe(0);
    expect(out[312]).toBe(1);
    expect(out[511]).toBe(200);
    expect(Array.from(extractZeroPhase(out, 401))).toEqual(Array.from(frame));
  });

  it('gives a centred symmetric pulse a purely real spectrum; naive placement does not', () => {
    // Odd length: a symmetric Hann pulse; even length: a periodic (DFT-even) Hann pulse.
    for (const [m, symmetry] of [[401, 'symmetric'], [400, 'periodic']] as const) {
      const pulse = createWindow('hann', m, symmetry);
      const zp = spectrumOf(placeZeroPhase(pulse, new Float64Array(512)));
      const naive = new Float64Array(512);
      naive.set(pulse);
      const nv = spectrumOf(naive);
      // Imaginary parts relative to the DC value: float rounding (< 1e-13) vs a linear phase ramp.
      expect(maxAbs(zp.im) / (zp.re[0] as number)).toBeLessThan(1e-13);
      expect(maxAbs(nv.im) / (nv.re[0] as number)).toBeGreaterThan(0.1);
    }
  });

  it('rejects a buffer shorter than the frame, naming the function', () => {
    expect(() => placeZeroPhase(new Float64Array(10), new Float64Array(8))).toThrow(refusedBy('placeZeroPhase'));
  });
});
