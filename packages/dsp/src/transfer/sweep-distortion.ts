import { fractionalOctaveBands, type OctaveFraction } from '../measures/octave-bands.js';
import { precondition } from '../util/preconditions.js';
import type { SweepAnalysis } from './sweep-analysis.js';

/** Harmonic distortion of one fractional-octave band of the fundamental. */
export interface SweepBandDistortion {
  /** Nominal mid-band frequency of the fundamental's band (IEC 61260-1 annex E), Hz. */
  centerHz: number;
  /** 2nd harmonic relative to the fundamental, percent; null when 2·f leaves the valid band. */
  h2Percent: number | null;
  /** 3rd harmonic relative to the fundamental, percent; null when 3·f leaves the valid band. */
  h3Percent: number | null;
  /** √(Σ h_k²) over the orders measured in this band, percent. */
  thdPercent: number;
  /** Highest order included in `thdPercent`. */
  highestOrder: number;
}

/** Options of `sweepDistortionByBand`. */
export interface SweepDistortionOptions {
  /** Bands of 1/b octave (default 3). */
  fraction?: OctaveFraction;
}

/**
 * Harmonic distortion against frequency from a sweep analysis: for each fractional-octave band
 * [fl, fu) of the fundamental that lies inside the valid band, and each harmonic response k whose
 * image [k·fl, k·fu) also does, h_k = √(mean |H_k|² over [k·fl, k·fu) / mean |H_1|² over [fl, fu)).
 * The k-th harmonic response's spectrum is indexed at the output frequency k·f for excitation at
 * f (Farina 2000), and the band [k·fl, k·fu) is exactly the image of [fl, fu) with the same
 * relative width, so band means compare like with like without resampling H_k onto the
 * fundamental's axis. THD = √(Σ_k h_k²) over the orders measured (the analysis's maxOrder,
 * those with k·fu inside the valid band, hence below Nyquist).
 * @returns one entry per band holding at least the 2nd harmonic, lowest band first
 * @throws RangeError on an unsupported fraction
 * @see A. Farina, "Simultaneous measurement of impulse response and distortion with a swept-sine
 *   technique", AES 108th Convention, 2000, preprint 5093 (harmonic responses); IEC 61260-1:2014
 *   (band edges); IEC 60268-3 (harmonic distortion of each order relative to the fundamental)
 */
export function sweepDistortionByBand(analysis: SweepAnalysis, options: SweepDistortionOptions = {}): SweepBandDistortion[] {
  const fraction = options.fraction ?? 3;
  precondition([1, 3, 6, 12].includes(fraction), 'sweepDistortionByBand', `fraction must be 1, 3, 6 or 12 (got ${fraction})`);
  const { transfer, validBandHz, harmonics } = analysis;
  const [lo, hi] = validBandHz;
  const out: SweepBandDistortion[] = [];
  if (!(hi > lo) || harmonics.length === 0) return out;
  const binHz = transfer.binHz;
  const bins = transfer.re.length;
  // Mean of values(j) over the bins j·step in [fl, fu) of a spectrum with `count` bins.
  const meanSquare = (values: (j: number) => number, fl: number, fu: number, step = binHz, count = bins): number => {
    const j0 = Math.max(1, Math.ceil(fl / step - 1e-9));
    const j1 = Math.min(count - 1, Math.ceil(fu / step - 1e-9) - 1);
    let s = 0;
    let n = 0;
    for (let j = j0; j <= j1; j++) {
      s += values(j);
      n++;
    }
    return n > 0 ? s / n : NaN;
  };
  const linear = (j: number): number => (transfer.re[j] as number) ** 2 + (transfer.im[j] as number) ** 2;
  for (const band of fractionalOctaveBands(fraction, lo, hi)) {
    if (band.lowerHz < lo || band.upperHz > hi) continue;
    const fundamental = meanSquare(linear, band.lowerHz, band.upperHz);
    if (!(fundamental > 0)) continue;
    const ratios = new Map<number, number>();
    for (const h of harmonics) {
      if (h.order * band.upperHz > hi) continue;
      const m = h.magnitude;
      const power = meanSquare((j) => (m[j] as number) ** 2, h.order * band.lowerHz, h.order * band.upperHz, h.binHz, m.length);
      if (Number.isFinite(power)) ratios.set(h.order, Math.sqrt(power / fundamental));
    }
    const h2 = ratios.get(2);
    if (h2 === undefined) continue;
    let sum = 0;
    let highestOrder = 0;
    for (const [k, r] of ratios) {
      sum += r * r;
      highestOrder = Math.max(highestOrder, k);
    }
    const h3 = ratios.get(3);
    out.push({ centerHz: band.nominalHz, h2Percent: 100 * h2, h3Percent: h3 === undefined ? null : 100 * h3, thdPercent: 100 * Math.sqrt(sum), highestOrder });
  }
  return out;
}
