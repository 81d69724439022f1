import type { SpectralMeasure } from '@earmark/contracts';
import { OCTAVE_RATIO } from '../measures/octave-bands.js';
import { MaskCheckError } from './mask-check-error.js';
import type { ChannelTransfer, CaptureContext } from '../context/capture-context.js';
import { smoothFractionalOctave } from './octave-smoothing.js';

/** Levels below this read as this (silence would be −∞ dB, which JSON cannot carry). */
export const DB_FLOOR = -400;

/** 10·log10(p), floored at DB_FLOOR. */
export function powerDb(p: number): number {
  return p > 0 ? Math.max(10 * Math.log10(p), DB_FLOOR) : DB_FLOOR;
}

/** Default frequency at which a transfer measure is normalised to 0 dB. */
export const DEFAULT_REFERENCE_HZ = 1000;

/**
 * Stimulus-power-weighted mean of |H|² over the bins with stimulus energy in [lowerHz, upperHz):
 * Σ|H_k|²·Pxx_k / ΣPxx_k (the same weighting as the analyze report's 1/3-octave |H|). Null when
 * no bin there carries stimulus energy.
 */
export function transferBandGain(t: ChannelTransfer, lowerHz: number, upperHz: number): number | null {
  const { tf, mag2 } = t;
  const k0 = Math.max(1, Math.ceil(lowerHz / tf.binHz - 1e-9));
  const k1 = Math.min(mag2.length - 1, Math.ceil(upperHz / tf.binHz - 1e-9) - 1);
  let num = 0;
  let den = 0;
  for (let k = k0; k <= k1; k++) {
    if (!tf.valid[k]) continue;
    const p = tf.referencePower[k] as number;
    num += (mag2[k] as number) * p;
    den += p;
  }
  return den > 0 ? num / den : null;
}

/**
 * |H|² the transfer measure is divided by: 1 for `referenceHz: null`, else the weighted mean |H|²
 * over the 1/3 octave centred on referenceHz (edges f·G^(±1/6), IEC 61260-1), which is steadier
 * than one bin of an H1 estimate and still exact for a flat response.
 * @throws MaskCheckError when the stimulus has no energy there or the capture is silent there
 */
export function referenceGain(t: ChannelTransfer, referenceHz: number | null): number {
  if (referenceHz === null) return 1;
  const edge = OCTAVE_RATIO ** (1 / 6);
  const g = transferBandGain(t, referenceHz / edge, referenceHz * edge);
  if (g === null) throw new MaskCheckError(`the stimulus has no energy within 1/3 octave of referenceHz ${referenceHz} Hz, so the response cannot be normalised there`);
  if (!(g > 0)) throw new MaskCheckError(`the capture holds no signal near referenceHz ${referenceHz} Hz, so the response cannot be normalised there`);
  return g;
}

/** Measured points of a spectral curve, ascending in frequency. */
export interface SpectrumPoints {
  hz: Float64Array;
  db: Float64Array;
}

/** What an envelope measures: the fields of a magnitude-envelope check that shape the curve. */
export interface EnvelopeMeasure {
  measure: SpectralMeasure;
  referenceHz?: number | null | undefined;
  smoothing?: number | undefined;
}

/**
 * The curve a magnitude envelope is compared with, at every bin inside `spanHz`: |H| in dB
 * normalised at referenceHz (bins where the stimulus has energy only), or the capture's level
 * spectrum in dBFS (a sine centred on a bin reads its level); optionally 1/N-octave smoothed
 * (power averaged).
 * @throws MaskCheckError when no bin is left to measure, or the transfer cannot be normalised (see referenceGain)
 * @see Hatziantoniou & Mourjopoulos, JAES 48(4), 2000 (smoothing); docs/masks.md, "magnitude-envelope"
 */
export function envelopePoints(ctx: CaptureContext, channel: number, check: EnvelopeMeasure, spanHz: readonly [number, number]): { points: SpectrumPoints; referenceGainDb: number | null } {
  let values: Float64Array;
  let include: Uint8Array | undefined;
  let binHz: number;
  let gain = 1;
  let referenceGainDb: number | null = null;
  if (check.measure === 'transfer') {
    const t = ctx.transfer(channel);
    const referenceHz = check.referenceHz === undefined ? DEFAULT_REFERENCE_HZ : check.referenceHz;
    gain = referenceGain(t, referenceHz);
    referenceGainDb = referenceHz === null ? null : powerDb(gain);
    include = t.tf.valid;
    binHz = t.tf.binHz;
    values = check.smoothing ? smoothFractionalOctave(t.mag2, binHz, check.smoothing, include) : t.mag2;
  } else {
    const s = ctx.levelSpectrum(channel);
    binHz = s.binHz;
    values = check.smoothing ? smoothFractionalOctave(s.amplitude2, binHz, check.smoothing) : s.amplitude2;
  }
  const k0 = Math.max(1, Math.ceil(spanHz[0] / binHz - 1e-9));
  const k1 = Math.min(values.length - 1, Math.floor(spanHz[1] / binHz + 1e-9));
  const hz: number[] = [];
  const db: number[] = [];
  for (let k = k0; k <= k1; k++) {
    if (include && !include[k]) continue;
    hz.push(k * binHz);
    db.push(powerDb((values[k] as number) / gain));
  }
  if (hz.length === 0) {
    const why = check.measure === 'transfer' ? ' where the stimulus has energy' : '';
    throw new MaskCheckError(`no measured frequency${why} lies within the limits' span ${spanHz[0]}…${spanHz[1]} Hz (bins every ${binHz.toFixed(3)} Hz up to ${((values.length - 1) * binHz).toFixed(0)} Hz)`);
  }
  return { points: { hz: Float64Array.from(hz), db: Float64Array.from(db) }, referenceGainDb };
}
