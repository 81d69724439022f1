import { EngineInputError } from '../util/engine-input-error.js';

/**
 * Exponential sine sweep x(n) = A·sin(2π·f1·T/ln(f2/f1)·(e^{t·ln(f2/f1)/T} − 1)), t = n/fs,
 * n = 0 … round(T·fs) − 1; its instantaneous frequency is f1·e^{t·ln(f2/f1)/T}, f1 at t = 0
 * and f2 at t = T (A. Farina, "Simultaneous measurement of impulse response and distortion
 * with a swept-sine technique", AES 108th Convention, 2000, preprint 5093).
 *
 * @throws RangeError unless 0 < f1 < f2 < fs/2 and T·fs ≥ 2 samples.
 */
export function exponentialSweep(sampleRate: number, f1: number, f2: number, seconds: number, amplitude: number): Float64Array {
  if (!(f1 > 0 && f1 < f2 && f2 < sampleRate / 2)) {
    throw new EngineInputError('exponentialSweep', `a sweep needs 0 < from < to < half the sample rate (got from ${f1} Hz, to ${f2} Hz at ${sampleRate} Hz)`);
  }
  const frames = Math.round(seconds * sampleRate);
  if (!(frames >= 2)) throw new EngineInputError('exponentialSweep', 'the sweep must last at least 2 samples');
  const rate = Math.log(f2 / f1) / seconds;
  const k = (2 * Math.PI * f1) / rate;
  const out = new Float64Array(frames);
  for (let n = 0; n < frames; n++) out[n] = amplitude * Math.sin(k * Math.expm1((rate * n) / sampleRate));
  return out;
}

/** Instantaneous frequency of the sweep at time t: f1·e^{t·ln(f2/f1)/T} (Farina 2000). */
export function sweepFrequencyAt(t: number, f1: number, f2: number, seconds: number): number {
  return f1 * Math.exp((t * Math.log(f2 / f1)) / seconds);
}

function dtftAt(x: Float64Array, omega: number): { re: number; im: number } {
  let re = 0;
  let im = 0;
  for (let n = 0; n < x.length; n++) {
    const v = x[n] as number;
    re += v * Math.cos(omega * n);
    im -= v * Math.sin(omega * n);
  }
  return { re, im };
}

/**
 * Farina's inverse filter for a sweep as played (level and fades included): the sweep
 * time-reversed, with an amplitude envelope proportional to the instantaneous frequency of
 * the sample it came from (f(t)/f2, i.e. −6 dB per octave as the reversed sweep falls from f2
 * to f1), which flattens the sweep's pink (−3 dB/octave) spectrum (Farina 2000, §3).
 * Normalisation: scaled so that |DTFT(sweep ⊛ inverse)| = 1 at the band centre √(f1·f2);
 * convolving a capture of a unity-gain path with it then gives an impulse response whose
 * magnitude response is 0 dB there. The linear response peaks at index frames − 1 of the
 * full convolution; harmonic distortion products appear before it.
 *
 * @throws RangeError when the sweep is silent (e.g. fades cover it completely).
 */
export function farinaInverseFilter(
  sweep: Float64Array,
  sampleRate: number,
  f1: number,
  f2: number,
  seconds: number,
): Float64Array {
  const frames = sweep.length;
  if (frames < 2) throw new EngineInputError('farinaInverseFilter', 'the sweep needs at least 2 samples');
  if (!(f1 > 0 && f1 < f2 && seconds > 0)) throw new EngineInputError('farinaInverseFilter', 'the sweep needs 0 < from < to and a duration above 0 s');
  const rate = Math.log(f2 / f1) / seconds;
  const inverse = new Float64Array(frames);
  for (let n = 0; n < frames; n++) {
    const envelope = (f1 / f2) * Math.exp((rate * n) / sampleRate); // f(t)/f2 with t = n/fs
    inverse[frames - 1 - n] = (sweep[n] as number) * envelope;
  }
  const omega = (2 * Math.PI * Math.sqrt(f1 * f2)) / sampleRate;
  const a = dtftAt(sweep, omega);
  const b = dtftAt(inverse, omega);
  const gain = Math.hypot(a.re, a.im) * Math.hypot(b.re, b.im);
  if (!(gain > 0)) throw new EngineInputError('farinaInverseFilter', 'the sweep is silent at its band centre');
  for (let n = 0; n < frames; n++) inverse[n] = (inverse[n] as number) / gain;
  return inverse;
}
