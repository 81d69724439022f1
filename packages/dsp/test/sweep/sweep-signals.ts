/**
 * Signals and the pre-existing transfer path for the sweep tests: references as a WAV would hold
 * them (samples only), realistic captures (latency filled with dithered idle noise, fades,
 * trailing silence), and the measurement as `MaskContext.transfer` makes it today.
 */
import { fitLinearPhase, groupDelayVariation } from '../../src/masks/phase-fit.js';
import { applyFades } from '../../src/stimulus/fade.js';
import { exponentialSweep } from '../../src/stimulus/sweep.js';
import { estimateLatency } from '../../src/transfer/fft-convolution.js';
import { estimateTransferFunction, type TransferFunction } from '../../src/transfer/transfer-function.js';
import { uniformRng } from '../helpers/signals.js';

/** A sweep reference: `lead` s of silence, the sweep (half-Hann fades of `fade` s), `tail` s of silence. */
export function sweepReference(fs: number, f1: number, f2: number, seconds: number, amplitude: number, opts: { lead?: number; tail?: number; fade?: number } = {}): Float64Array {
  const body = exponentialSweep(fs, f1, f2, seconds, amplitude);
  const fade = Math.round((opts.fade ?? 0) * fs);
  if (fade > 0) applyFades(body, fade, fade);
  const lead = Math.round((opts.lead ?? 0) * fs);
  const out = new Float64Array(lead + body.length + Math.round((opts.tail ?? 0.5) * fs));
  out.set(body, lead);
  return out;
}

/** TPDF dither of a 24-bit converter: (u1 − u2)·2^−23, RMS 2^−23/√6 ≈ −145 dBFS (AES17 dBFS: −142 dB re a full-scale sine's RMS). */
export function tpdfDither24(length: number, seed: number): Float64Array {
  const u = uniformRng(seed);
  const lsb = 2 ** -23;
  const out = new Float64Array(length);
  for (let i = 0; i < length; i++) out[i] = (u() - u()) * lsb;
  return out;
}

/** A capture: `latency` samples of idle dither, then y, then `tail` samples of idle dither. */
export function captureOf(y: Float64Array, latency: number, tail: number, seed = 1): Float64Array {
  const out = tpdfDither24(latency + y.length + tail, seed);
  for (let i = 0; i < y.length; i++) out[latency + i] = (out[latency + i] as number) + (y[i] as number);
  return out;
}

/** |H|² per valid bin, as `MaskContext.transfer` builds it. */
export function channelTransfer(tf: TransferFunction, latencySamples: number): { latencySamples: number; tf: TransferFunction; mag2: Float64Array } {
  const mag2 = new Float64Array(tf.re.length);
  for (let k = 0; k < mag2.length; k++) if (tf.valid[k]) mag2[k] = (tf.re[k] as number) ** 2 + (tf.im[k] as number) ** 2;
  return { latencySamples, tf, mag2 };
}

/** Phase-linearity and group-delay-variation readings as the mask checks take them (phase-fit.ts). */
export function phaseReadings(tf: TransferFunction, latencySamples: number, fs: number): { deviationDeg: number; groupDelayVariationMs: number } {
  const fit = fitLinearPhase(channelTransfer(tf, latencySamples), fs);
  if (!fit) throw new Error('no phase fit');
  const gd = groupDelayVariation(fit);
  if (!gd) throw new Error('no group-delay variation');
  return { deviationDeg: fit.maxDeviationDeg, groupDelayVariationMs: 1000 * gd.seconds };
}

/** Today's path (MaskContext.transfer): latency by cross-correlation, align, one transfer estimate over all bins ≥ −60 dB. */
export function transferToday(reference: Float64Array, capture: Float64Array, fs: number, method: 'h1' | 'deconvolution'): { tf: TransferFunction; latencySamples: number } {
  const latencySamples = estimateLatency(reference, capture);
  const aligned = new Float64Array(reference.length);
  for (let i = 0; i < reference.length; i++) {
    const j = i + latencySamples;
    aligned[i] = j >= 0 && j < capture.length ? (capture[j] as number) : 0;
  }
  return { tf: estimateTransferFunction(reference, aligned, fs, { method }), latencySamples };
}

/** |H| in dB and phase in degrees at the bin nearest f, and that bin's own frequency `hz` (compare closed forms there). */
export function responseAt(tf: TransferFunction, f: number): { db: number; deg: number; valid: boolean; hz: number } {
  const k = Math.round(f / tf.binHz);
  const re = tf.re[k] as number;
  const im = tf.im[k] as number;
  return { db: 10 * Math.log10(re * re + im * im), deg: (Math.atan2(im, re) * 180) / Math.PI, valid: tf.valid[k] === 1, hz: k * tf.binHz };
}
