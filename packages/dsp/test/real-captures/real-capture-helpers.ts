/**
 * Closed forms and small helpers for the field-report tests: captures as a rig returns them,
 * analysed only through the public entry points `analyzeCapture` and `evaluateMask`.
 *
 * dBFS follows AES17 (a full-scale sine reads 0 dBFS), so a sine at L dBFS carries the mean
 * square P = 10^(L/10)/2 and a noise of variance σ² reads 10·log10(2σ²) dBFS.
 */
import type { CheckEvaluation, MaskEvaluation } from '@earmark/contracts';
import { MaskDocument, type MaskCheckInput } from '@earmark/contracts';

/** Mean square of a sine at `dbfs` (AES17: full-scale sine = 0 dBFS, amplitude 10^(L/20)). */
export const sinePower = (dbfs: number): number => 10 ** (dbfs / 10) / 2;

/** 10·log10 of a power ratio. */
export const db = (ratio: number): number => 10 * Math.log10(ratio);

/**
 * Variance of the total error of a `bits`-bit quantiser with ±1 LSB TPDF dither added before
 * rounding: Δ²/12 (rounding) + Δ²/6 (dither) = Δ²/4, Δ = 2^(1−bits), independent of the signal
 * (S. P. Lipshitz, R. A. Wannamaker, J. Vanderkooy, "Quantization and dither: a theoretical
 * survey", JAES 40(5), 1992). This is what `tpdfQuantise` in audio-band/capture-signals.ts adds.
 */
export const tpdfErrorPower = (bits: number): number => 2 ** (2 * (1 - bits)) / 4;

/**
 * Error variance of plain rounding to `bits` bits, Δ²/12 (W. R. Bennett, "Spectra of quantized
 * signals", Bell Syst. Tech. J. 27, 1948: valid when the signal spans many steps).
 */
export const roundingErrorPower = (bits: number): number => 2 ** (2 * (1 - bits)) / 12;

/** Share of a white noise's power (0 … fs/2) inside the AES17 band 20 Hz … min(20 kHz, fs/2). */
export const inBandFraction = (sampleRate: number): number => (Math.min(20000, sampleRate / 2) - 20) / (sampleRate / 2);

/**
 * ∫ A(f)² df over 20 Hz … 20 kHz, in Hz: the A-weighted noise bandwidth of white noise, with A(f)
 * the IEC 61672-1:2013 annex E closed form normalised to 0 dB at 1 kHz (A1000 = −2.00 dB). From
 * scipy 1.17: `quad(lambda f: Aw(f)**2, 20, 20000, limit=500)[0]` with
 * `Aw = lambda f: 12194**2*f**4/((f*f+20.6**2)*sqrt((f*f+107.7**2)*(f*f+737.9**2))*(f*f+12194**2))*10**(2/20)`.
 */
export const A_WEIGHTED_BANDWIDTH_HZ = 12467.86;

/**
 * Standard deviation, in dB, of the engine's band-power reading of white noise: the record is
 * Kaiser-windowed (β = 20, measures/audio-band.ts), so the reading is a quadratic form whose
 * relative variance is 2·(Σw⁴/(Σw²)²)·(fs/2)/B (Harris, Proc. IEEE 66(1), 1978, window
 * variance ratio). Values from numpy 2.4 for the record lengths used here:
 * `w = np.kaiser(N, 20.0); r = (w**4).sum()/(w**2).sum()**2; 10*np.log10(1 + np.sqrt(2*r*(fs/2)/19980))`
 * (with A weighting: `np.sqrt(2*r*(fs/2)*IA4/IA2**2)`, IA4 = ∫A⁴ df = 11242.89 Hz).
 */
export const BAND_POWER_SIGMA_DB = {
  /** N = 48000 (1 s at 48 kHz), 44100 (1 s at 44.1 kHz), 96000 (1 s at 96 kHz), 192000 (1 s at 192 kHz): the ratio depends on N/fs only. */
  oneSecond: 0.0577,
  /** About 2 s at any rate: 0.0409 for N = 2·fs, 0.0413 for the 1.96 s steady part of a 2 s 96 kHz record (the larger is kept). */
  twoSeconds: 0.0413,
  /** N = 4800 at 48 kHz (0.1 s). */
  tenthSecond: 0.18,
  /** N = 88320 at 48 kHz (the 1.84 s steady part of a 2 s tone with 50 ms fades). */
  faded2s: 0.0426,
  /** N = 70560 at 48 kHz, A-weighted (the 1.47 s steady part of a −60 dBFS tone after 0.1 s of idle noise). */
  weighted1470ms: 0.0572,
  /** N = 96000 at 48 kHz, A-weighted. */
  weighted2s: 0.0491,
} as const;

/** A mask from plain check objects (parsed, so defaults apply as they would at the API). */
export function mask(...checks: MaskCheckInput[]): MaskDocument {
  return MaskDocument.parse({ checks });
}

/** The evaluated check with this id; throws when it is missing (a test setup error). */
export function checkOf(evaluation: MaskEvaluation, id: string): CheckEvaluation {
  const found = evaluation.checks.find((c) => c.id === id);
  if (!found) throw new Error(`no check "${id}" in the evaluation`);
  return found;
}

/** Warnings attached to a check (details.warnings), or []. */
export function checkWarnings(check: CheckEvaluation): string[] {
  const w = check.details.warnings;
  return Array.isArray(w) ? w.map(String) : [];
}
