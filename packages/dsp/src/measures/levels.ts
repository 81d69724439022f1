import { rmsToDbfs } from '../spectrum/db.js';
import { precondition } from '../util/preconditions.js';

/** Time-domain level measures of one channel. */
export interface SignalLevels {
  rms: number;
  peak: number;
  /** 20·log10(rms·√2), AES17 (a full-scale sine reads 0 dBFS); −Infinity for silence. */
  rmsDbfs: number;
  /** 20·log10(peak), so a full-scale sine's peak also reads 0 dBFS. */
  peakDbfs: number;
  /** 20·log10(peak/rms); a sine reads 3.01 dB. NaN for silence. */
  crestFactorDb: number;
  /** Mean value. */
  dcOffset: number;
  /** Σx², the time-domain side of the Parseval check. */
  energy: number;
}

/**
 * RMS, peak, crest factor, DC offset and energy in one pass (clipping: `detectClipping`).
 * @throws RangeError on an empty signal
 * @see AES17-2020 (full-scale sine = 0 dBFS); crest factor = peak/RMS (IEC 60050-103)
 */
export function measureLevels(x: Float64Array): SignalLevels {
  const fn = 'measureLevels';
  precondition(x.length >= 1, fn, 'signal must not be empty');
  let sum = 0;
  let sumSq = 0;
  let peak = 0;
  for (let i = 0; i < x.length; i++) {
    const v = x[i] as number;
    const a = Math.abs(v);
    sum += v;
    sumSq += v * v;
    if (a > peak) peak = a;
  }
  const rms = Math.sqrt(sumSq / x.length);
  return {
    rms,
    peak,
    rmsDbfs: rmsToDbfs(rms),
    peakDbfs: 20 * Math.log10(peak),
    crestFactorDb: 20 * Math.log10(peak / rms),
    dcOffset: sum / x.length,
    energy: sumSq,
  };
}

/**
 * Energy of a signal from its one-sided unscaled spectrum (N/2 + 1 bins of an N-point FFT of
 * the zero-padded signal): (1/N)·(|X₀|² + |X_{N/2}|² + 2·Σ|X_k|²). Equal to Σx² by Parseval.
 * @throws RangeError when re/im lengths differ or do not match N/2 + 1
 * @see Oppenheim & Schafer, "Discrete-Time Signal Processing", 3rd ed., §8.6 (Parseval's relation)
 */
export function spectralEnergy(re: Float64Array, im: Float64Array, fftSize: number): number {
  precondition(re.length === im.length && re.length === fftSize / 2 + 1, 'spectralEnergy', `re and im must hold fftSize/2 + 1 = ${fftSize / 2 + 1} bins`);
  const last = re.length - 1;
  let e = 0;
  for (let k = 0; k <= last; k++) {
    const p = (re[k] as number) ** 2 + (im[k] as number) ** 2;
    e += k === 0 || k === last ? p : 2 * p;
  }
  return e / fftSize;
}
