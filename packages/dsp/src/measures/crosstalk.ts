import { createRealFftPlan } from '../fft/real-fft.js';
import { createWindow } from '../spectrum/windows.js';
import { precondition, requirePositive } from '../util/preconditions.js';
import { OCTAVE_RATIO, fractionalOctaveBands } from './octave-bands.js';

/** Options of `measureCrosstalk`. */
export interface CrosstalkOptions {
  /** Lowest and highest 1/3-octave mid-band frequency reported (default 20 Hz … 20 kHz; bands reaching past fs/2 are left out). */
  bandsHz?: readonly [number, number];
  /** Frequency range over which `worst` is taken (default: all reported bands). */
  worstRangeHz?: readonly [number, number];
  /** Welch segment length, a power of two; default: fine enough for ≥ 4 bins in the lowest band, coarse enough for ≥ 8 segments. */
  segmentLength?: number;
  /** Samples [start, end) to analyse (default the whole capture). */
  range?: readonly [number, number];
  /** A band is noise-limited when less than this fraction of the undriven band power is coherent with the driven channel (default 0.5). */
  minCoherentFraction?: number;
}

/** Separation in one 1/3-octave band. */
export interface CrosstalkBand {
  /** Exact mid-band frequency (IEC 61260-1), Hz. */
  centerHz: number;
  /** Nominal mid-band frequency, Hz. */
  nominalHz: number;
  /** L_driven − L_undriven in the band, dB (positive: the undriven channel is quieter). */
  separationDb: number;
  /** −separationDb: the leak relative to the driven channel, dB. */
  crosstalkDb: number;
  /** Band levels, dBFS (AES17). */
  drivenDbfs: number;
  undrivenDbfs: number;
  /** Fraction of the undriven band power coherent with the driven channel, 0…1 (biased up by about 1/segments). */
  coherentFraction: number;
  /**
   * True when the undriven channel's band power is mostly not coherent with the driven channel
   * (idle noise, hum, or nonlinear products): the true separation is then at least `separationDb`.
   */
  noiseLimited: boolean;
}

/** Separation of one undriven channel. */
export interface CrosstalkChannel {
  channel: number;
  bands: CrosstalkBand[];
  /** The band with the smallest separation in the worst-case range (null if none); if noise-limited, read it as "at least". */
  worst: CrosstalkBand | null;
}

/** Crosstalk of a capture in which one channel was driven. */
export interface CrosstalkResult {
  drivenChannel: number;
  segmentLength: number;
  segments: number;
  binHz: number;
  channels: CrosstalkChannel[];
}

/** Largest power of two ≤ n (n ≥ 1). */
function floorPowerOfTwo(n: number): number {
  let p = 1;
  while (p * 2 <= n) p *= 2;
  return p;
}

/**
 * Crosstalk (channel separation) versus frequency from a capture in which only channel
 * `drivenChannel` carried a stimulus (sweep, noise or multitone). One Welch pass (Hann,
 * 50 % overlap, mean removed per segment) accumulates the driven channel's auto spectrum
 * Pdd, each undriven channel's Puu and the cross spectrum Pdu. Per 1/3-octave band
 * (IEC 61260-1 mid-band frequencies and edges, bins lowerHz ≤ f < upperHz):
 *   separation = 10·log10(Σ Pdd / Σ Puu)  dB,
 * the level difference AES17 and IEC 60268-3 call separation (its negative is the crosstalk).
 * Noise decision: the coherent part of the undriven power, Σ |Pdu|²/Pdd (Bendat & Piersol's
 * coherent output power), is compared with the total Σ Puu; when it is below
 * `minCoherentFraction` (default ½: the leak is weaker than the noise, so the total-power
 * reading is off by more than 3 dB) the band is flagged `noiseLimited`, and `separationDb`,
 * computed from total power, is a lower bound ("at least"). Bands with fewer than 2 bins
 * are left out. The capture needs no alignment: all channels share one clock and latency.
 * @throws RangeError on fewer than 2 channels, unequal lengths, a bad driven index, rate,
 *   options or range, or a record too short for 8 segments of 256 samples
 * @see IEC 60268-3:2013 (crosstalk and separation, from memory); AES17-2020 §9 (crosstalk,
 *   from memory); IEC 61260-1:2014 §5 (bands); P. D. Welch, IEEE Trans. Audio Electroacoust.
 *   15(2), 1967; J. S. Bendat, A. G. Piersol, "Random Data", 4th ed., Wiley 2010, §9.2.3
 *   (coherent output spectrum)
 */
export function measureCrosstalk(channels: readonly Float64Array[], sampleRate: number, drivenChannel: number, options: CrosstalkOptions = {}): CrosstalkResult {
  const fn = 'measureCrosstalk';
  precondition(channels.length >= 2, fn, `need at least 2 channels (got ${channels.length})`);
  requirePositive(sampleRate, fn, 'sampleRate');
  precondition(Number.isInteger(drivenChannel) && drivenChannel >= 0 && drivenChannel < channels.length, fn, `drivenChannel must be 0…${channels.length - 1} (got ${drivenChannel})`);
  const length = (channels[0] as Float64Array).length;
  precondition(channels.every((c) => c.length === length), fn, 'all channels must have the same length');
  const [start, end] = options.range ?? [0, length];
  precondition(Number.isInteger(start) && Number.isInteger(end) && start >= 0 && end <= length && end > start, fn, `range must lie inside the ${length} samples (got ${start}…${end})`);
  const span = end - start;
  const [minCenter, maxCenter] = options.bandsHz ?? [20, 20000];
  requirePositive(minCenter, fn, 'bandsHz[0]');
  precondition(maxCenter >= minCenter, fn, `bandsHz must be ascending (got ${minCenter}…${maxCenter})`);
  const threshold = options.minCoherentFraction ?? 0.5;
  precondition(threshold > 0 && threshold < 1, fn, `minCoherentFraction must lie in (0, 1) (got ${threshold})`);
  // A 1/3-octave band is f_m·(G^{1/6} − G^{−1/6}) ≈ 0.2316·f_m wide; 4 bins in the lowest one.
  const lowestWidth = minCenter * (OCTAVE_RATIO ** (1 / 6) - OCTAVE_RATIO ** (-1 / 6));
  const fine = floorPowerOfTwo(Math.ceil((4 * sampleRate) / lowestWidth)) * 2;
  const coarse = floorPowerOfTwo(Math.floor((2 * span) / 9)); // ≥ 8 half-overlapping segments
  const segmentLength = options.segmentLength ?? Math.max(256, Math.min(fine, coarse));
  precondition(Number.isInteger(segmentLength) && segmentLength >= 256 && (segmentLength & (segmentLength - 1)) === 0, fn, `segmentLength must be a power of two ≥ 256 (got ${segmentLength})`);
  const step = segmentLength / 2;
  const segments = Math.floor((span - segmentLength) / step) + 1;
  precondition(segments >= 8 || options.segmentLength !== undefined, fn, `the record (${span} samples) is too short for 8 segments of ${segmentLength}`);
  precondition(segments >= 1, fn, `the record (${span} samples) is shorter than one segment (${segmentLength})`);

  const window = createWindow('hann', segmentLength, 'periodic');
  let windowPower = 0;
  for (const w of window) windowPower += w * w;
  const plan = createRealFftPlan(segmentLength);
  const bins = plan.bins;
  const buffer = new Float64Array(segmentLength);
  const dr = new Float64Array(bins);
  const di = new Float64Array(bins);
  const ur = new Float64Array(bins);
  const ui = new Float64Array(bins);
  const others = channels.map((_, c) => c).filter((c) => c !== drivenChannel);
  const pdd = new Float64Array(bins);
  const puu = others.map(() => new Float64Array(bins));
  const pduRe = others.map(() => new Float64Array(bins));
  const pduIm = others.map(() => new Float64Array(bins));
  const load = (x: Float64Array, from: number): void => {
    let mean = 0;
    for (let i = 0; i < segmentLength; i++) mean += x[from + i] as number;
    mean /= segmentLength;
    for (let i = 0; i < segmentLength; i++) buffer[i] = ((x[from + i] as number) - mean) * (window[i] as number);
  };
  for (let s = 0; s < segments; s++) {
    const from = start + s * step;
    load(channels[drivenChannel] as Float64Array, from);
    plan.forward(buffer, dr, di);
    for (let k = 0; k < bins; k++) pdd[k] = (pdd[k] as number) + (dr[k] as number) ** 2 + (di[k] as number) ** 2;
    others.forEach((c, j) => {
      load(channels[c] as Float64Array, from);
      plan.forward(buffer, ur, ui);
      const uu = puu[j] as Float64Array;
      const cr = pduRe[j] as Float64Array;
      const ci = pduIm[j] as Float64Array;
      for (let k = 0; k < bins; k++) {
        const xr = dr[k] as number;
        const xi = di[k] as number;
        const yr = ur[k] as number;
        const yi = ui[k] as number;
        uu[k] = (uu[k] as number) + yr * yr + yi * yi;
        // conj(D)·U
        cr[k] = (cr[k] as number) + xr * yr + xi * yi;
        ci[k] = (ci[k] as number) + xr * yi - xi * yr;
      }
    });
  }

  const binHz = sampleRate / segmentLength;
  // Parseval per segment: mean square ≈ (2/L)·Σ_k |X_k|² / Σw² over one-sided bins, averaged over segments.
  const toMeanSquare = 2 / (segmentLength * windowPower * segments);
  const bands = fractionalOctaveBands(3, minCenter, maxCenter).filter((b) => b.upperHz <= sampleRate / 2);
  const [worstLow, worstHigh] = options.worstRangeHz ?? [0, Number.POSITIVE_INFINITY];
  const result: CrosstalkChannel[] = others.map((c, j) => {
    const uu = puu[j] as Float64Array;
    const cr = pduRe[j] as Float64Array;
    const ci = pduIm[j] as Float64Array;
    const out: CrosstalkBand[] = [];
    for (const band of bands) {
      const k0 = Math.max(1, Math.ceil(band.lowerHz / binHz - 1e-9));
      const k1 = Math.min(bins - 1, Math.ceil(band.upperHz / binHz - 1e-9) - 1);
      if (k1 - k0 + 1 < 2) continue;
      let d = 0;
      let u = 0;
      let coherent = 0;
      for (let k = k0; k <= k1; k++) {
        const p = pdd[k] as number;
        d += p;
        u += uu[k] as number;
        if (p > 0) coherent += ((cr[k] as number) ** 2 + (ci[k] as number) ** 2) / p;
      }
      if (!(d > 0)) continue;
      const separationDb = 10 * Math.log10(d / u);
      const coherentFraction = u > 0 ? Math.min(1, coherent / u) : 0;
      out.push({
        centerHz: band.centerHz,
        nominalHz: band.nominalHz,
        separationDb,
        crosstalkDb: -separationDb,
        drivenDbfs: 10 * Math.log10(2 * d * toMeanSquare),
        undrivenDbfs: 10 * Math.log10(2 * u * toMeanSquare),
        coherentFraction,
        noiseLimited: coherentFraction < threshold,
      });
    }
    let worst: CrosstalkBand | null = null;
    for (const b of out) if (b.centerHz >= worstLow && b.centerHz <= worstHigh && (worst === null || b.separationDb < worst.separationDb)) worst = b;
    return { channel: c, bands: out, worst };
  });
  return { drivenChannel, segmentLength, segments, binHz, channels: result };
}
