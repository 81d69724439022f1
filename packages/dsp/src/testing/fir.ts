import { createWindow } from '../spectrum/windows.js';
import { precondition, requirePositive } from '../util/preconditions.js';

/**
 * Linear-phase low-pass FIR by the window method: h[n] = 2fc/fs·sinc(2fc/fs·(n − M))·w[n],
 * n = 0 … 2M, with a symmetric Blackman window, scaled to exactly 0 dB at DC. The taps are
 * symmetric, so the group delay is exactly M = (taps − 1)/2 samples at every frequency.
 * @param taps odd length 2M + 1
 * @throws RangeError unless taps is odd and ≥ 3 and 0 < cutoffHz < fs/2
 * @see A. V. Oppenheim, R. W. Schafer, "Discrete-Time Signal Processing", 3rd ed., §7.5 (design
 *   of FIR filters by windowing) and §5.7 (generalised linear phase of symmetric FIR filters)
 */
export function windowedSincLowPass(fs: number, cutoffHz: number, taps: number): Float64Array {
  const fn = 'windowedSincLowPass';
  requirePositive(fs, fn, 'fs');
  precondition(Number.isInteger(taps) && taps >= 3 && taps % 2 === 1, fn, `taps must be an odd whole number ≥ 3 (got ${taps})`);
  precondition(cutoffHz > 0 && cutoffHz < fs / 2, fn, `cutoffHz must lie in (0, fs/2) (got ${cutoffHz})`);
  const m = (taps - 1) / 2;
  const fc = cutoffHz / fs;
  const w = createWindow('blackman', taps, 'symmetric');
  const h = new Float64Array(taps);
  let sum = 0;
  for (let n = 0; n < taps; n++) {
    const t = n - m;
    const sinc = t === 0 ? 2 * fc : Math.sin(2 * Math.PI * fc * t) / (Math.PI * t);
    h[n] = sinc * (w[n] as number);
    sum += h[n] as number;
  }
  for (let n = 0; n < taps; n++) h[n] = (h[n] as number) / sum;
  return h;
}

/**
 * Filters x through FIR taps by direct convolution with zero initial state, y[n] = Σ h[k]·x[n − k];
 * returns a new array of x's length (the tail past the input's end is dropped, as a capture
 * of fixed length would drop it).
 * @throws RangeError on empty taps
 * @see Oppenheim & Schafer §2.3 (convolution sum)
 */
export function applyFir(x: Float64Array, taps: Float64Array): Float64Array {
  precondition(taps.length >= 1, 'applyFir', 'taps must not be empty');
  const y = new Float64Array(x.length);
  for (let n = 0; n < x.length; n++) {
    let acc = 0;
    const kMax = Math.min(taps.length - 1, n);
    for (let k = 0; k <= kMax; k++) acc += (taps[k] as number) * (x[n - k] as number);
    y[n] = acc;
  }
  return y;
}

/**
 * Magnitude of an FIR's frequency response at f, 20·log10|Σ h[n]·e^{−jωn}|, ω = 2π·f/fs.
 * @throws RangeError on a non-positive fs
 * @see definition of the DTFT (Oppenheim & Schafer §2.7)
 */
export function firMagnitudeDb(taps: Float64Array, fs: number, f: number): number {
  requirePositive(fs, 'firMagnitudeDb', 'fs');
  const w = (2 * Math.PI * f) / fs;
  let re = 0;
  let im = 0;
  for (let n = 0; n < taps.length; n++) {
    re += (taps[n] as number) * Math.cos(w * n);
    im -= (taps[n] as number) * Math.sin(w * n);
  }
  return 20 * Math.log10(Math.hypot(re, im));
}
