import { fractionalOctaveBands } from '../measures/octave-bands.js';
import { unwrapPhase } from '../spectrum/unwrap.js';
import { precondition } from '../util/preconditions.js';
import { groupDelayFromPhase } from './group-delay.js';
import type { TransferFunction } from './transfer-function.js';

/** Options of `summarizeTransfer`. */
export interface TransferSummaryOptions {
  /** Band for group delay and phase linearity; default: where |H| is within `rangeDb` of its maximum. */
  bandHz?: readonly [number, number];
  /** Default 20 dB. */
  rangeDb?: number;
  /** Bulk delay removed before estimating H, in samples; added back to the group delay. */
  latencySamples?: number;
  sampleRate: number;
}

/** Phase and group-delay summary of a transfer function. */
export interface TransferSummary {
  bandHz: [number, number] | null;
  /** Mean group delay in seconds (latency included): −slope/(2π) of the weighted phase line. */
  groupDelayMean: number | null;
  /** Largest |τ(f) − mean| over the band, seconds. */
  groupDelayMaxDeviation: number | null;
  /** Largest |φ(f) − line(f)| over the band, degrees. */
  linearPhaseDeviationDeg: number | null;
  /** Energy-weighted |H|² per 1/3-octave band holding valid bins, dB. */
  magnitudeDb: { centerHz: number; db: number }[];
}

/**
 * Group delay and deviation from linear phase over the band where |H| is within 20 dB of its
 * maximum (valid bins only), and |H| per third-octave band. The phase of the band's bins is
 * unwrapped as one sequence (skipping bins without stimulus energy), fitted by a straight line
 * with weights |H| (weighted least squares), and the group delay is −dφ/dω by differences.
 * @throws RangeError on a non-positive sample rate or range
 * @see Oppenheim & Schafer, §5.1 (group delay, linear phase); numpy.unwrap semantics for the phase
 */
export function summarizeTransfer(tf: TransferFunction, options: TransferSummaryOptions): TransferSummary {
  const fn = 'summarizeTransfer';
  precondition(options.sampleRate > 0, fn, 'sampleRate must be > 0');
  const rangeDb = options.rangeDb ?? 20;
  precondition(rangeDb > 0, fn, `rangeDb must be > 0 (got ${rangeDb})`);
  const bins = tf.re.length;
  const mag2 = new Float64Array(bins);
  let maxMag2 = 0;
  for (let k = 1; k < bins; k++) {
    if (!tf.valid[k]) continue;
    const m = (tf.re[k] as number) ** 2 + (tf.im[k] as number) ** 2;
    mag2[k] = m;
    if (m > maxMag2) maxMag2 = m;
  }
  const floor = maxMag2 * 10 ** (-rangeDb / 10);
  const chosen: number[] = [];
  for (let k = 1; k < bins; k++) {
    if (!tf.valid[k]) continue;
    const f = k * tf.binHz;
    if (options.bandHz ? f >= options.bandHz[0] && f <= options.bandHz[1] : (mag2[k] as number) >= floor && (mag2[k] as number) > 0) chosen.push(k);
  }
  const magnitudeDb = thirdOctaveMagnitudes(tf, mag2);
  const latency = (options.latencySamples ?? 0) / options.sampleRate;
  if (chosen.length < 3) {
    return { bandHz: chosen.length ? [(chosen[0] as number) * tf.binHz, (chosen[chosen.length - 1] as number) * tf.binHz] : null, groupDelayMean: null, groupDelayMaxDeviation: null, linearPhaseDeviationDeg: null, magnitudeDb };
  }
  const m = chosen.length;
  const freq = new Float64Array(m);
  const phase = new Float64Array(m);
  const weight = new Float64Array(m);
  chosen.forEach((k, i) => {
    freq[i] = k * tf.binHz;
    phase[i] = Math.atan2(tf.im[k] as number, tf.re[k] as number);
    weight[i] = Math.sqrt(mag2[k] as number);
  });
  unwrapPhase(phase, phase);
  // Weighted least-squares line φ ≈ α + β·f
  let sw = 0, sf = 0, sp = 0, sff = 0, sfp = 0;
  for (let i = 0; i < m; i++) {
    const w = weight[i] as number;
    const f = freq[i] as number;
    const p = phase[i] as number;
    sw += w;
    sf += w * f;
    sp += w * p;
    sff += w * f * f;
    sfp += w * f * p;
  }
  const det = sw * sff - sf * sf;
  const beta = det !== 0 ? (sw * sfp - sf * sp) / det : 0;
  const alpha = (sp - beta * sf) / sw;
  let maxDev = 0;
  for (let i = 0; i < m; i++) maxDev = Math.max(maxDev, Math.abs((phase[i] as number) - (alpha + beta * (freq[i] as number))));
  const meanDelay = -beta / (2 * Math.PI);
  const gd = groupDelayFromPhase(freq, phase);
  let maxGdDev = 0;
  for (const v of gd) maxGdDev = Math.max(maxGdDev, Math.abs(v - meanDelay));
  return {
    bandHz: [freq[0] as number, freq[m - 1] as number],
    groupDelayMean: meanDelay + latency,
    groupDelayMaxDeviation: maxGdDev,
    linearPhaseDeviationDeg: (maxDev * 180) / Math.PI,
    magnitudeDb,
  };
}

/** Σ|H|²·Pxx / ΣPxx over each 1/3-octave band's valid bins, in dB. */
function thirdOctaveMagnitudes(tf: TransferFunction, mag2: Float64Array): { centerHz: number; db: number }[] {
  const nyquist = (tf.re.length - 1) * tf.binHz;
  const out: { centerHz: number; db: number }[] = [];
  if (nyquist < 25) return out;
  for (const band of fractionalOctaveBands(3, 24, nyquist)) {
    if (band.upperHz > nyquist) continue;
    const k0 = Math.max(1, Math.ceil(band.lowerHz / tf.binHz - 1e-9));
    const k1 = Math.min(tf.re.length - 1, Math.ceil(band.upperHz / tf.binHz - 1e-9) - 1);
    let num = 0;
    let den = 0;
    for (let k = k0; k <= k1; k++) {
      if (!tf.valid[k]) continue;
      const p = tf.referencePower[k] as number;
      num += (mag2[k] as number) * p;
      den += p;
    }
    if (den > 0 && num > 0) out.push({ centerHz: band.nominalHz, db: 10 * Math.log10(num / den) });
  }
  return out;
}
