import { precondition, requirePositive } from '../util/preconditions.js';
import { aWeightingGain } from './a-weighting.js';
import type { AudioBandPower } from './audio-band.js';
import type { HarmonicComponent, HarmonicFit } from './sine-fit.js';

/**
 * Relative tolerance of the band edges: a fitted frequency within 1e-6 of an edge counts as
 * inside, so a tone at exactly 20 kHz does not flip in or out on the fit's last bit.
 */
export const BAND_EDGE_TOLERANCE = 1e-6;

/** Tone measures of one channel; null fields are explained in `warnings`. */
export interface ToneMeasures {
  fundamentalHz: number;
  /** Peak amplitude of the fitted fundamental (full scale = 1). */
  amplitude: number;
  /** 20·log10(amplitude): the fundamental's level in dBFS (AES17). */
  levelDbfs: number;
  /** Harmonics 2…K below Nyquist, from the joint fit. */
  harmonics: HarmonicComponent[];
  /** 100·√(Σ A_k², k = 2…K below Nyquist)/A_1; null when no harmonic lies below Nyquist. */
  thdPercent: number | null;
  /** 20·log10(thdPercent/100). */
  thdDb: number | null;
  /** 10·log10((N + H)/(P1 + N + H)): in-band noise N and harmonics H relative to the total signal. */
  thdnDb: number;
  thdnPercent: number;
  /** The same with N and H A-weighted and the total unweighted (AES17: weighting on the noise only). */
  thdnDbA: number;
  /** 10·log10(P1/N), harmonics excluded. */
  snrDb: number;
  /** 10·log10(P1/N_A), the fundamental unweighted. */
  snrDbA: number;
  /** 10·log10(P1/(N + H)). */
  sinadDb: number;
  /** (SINAD − 1.76)/6.02. */
  enob: number;
}

/** Tone measures plus the noise floor, which exists with or without a tone. */
export interface ToneMeasuresResult {
  /** Null without a fitted tone, or when the fundamental lies outside the band. */
  tone: ToneMeasures | null;
  bandHz: [number, number];
  /** In-band mean-square noise (residual after DC, fundamental and harmonics), plain and A-weighted. */
  noisePower: number;
  noisePowerA: number;
  /** 10·log10(2·N) in dBFS (full-scale sine = 0 dBFS); null for a record with no noise at all. */
  noiseFloorDbfs: number | null;
  noiseFloorDbfsA: number | null;
  /** Plain-word reasons for every null above. */
  warnings: string[];
}

/** True when f lies in [lo, hi], edges inclusive with a relative tolerance. */
export function inBandInclusive(frequencyHz: number, bandHz: readonly [number, number], tolerance = BAND_EDGE_TOLERANCE): boolean {
  return frequencyHz >= bandHz[0] * (1 - tolerance) && frequencyHz <= bandHz[1] * (1 + tolerance);
}

const dbOrNull = (p: number): number | null => (p > 0 && Number.isFinite(p) ? 10 * Math.log10(p) : null);

/**
 * THD, THD+N, SNR, SINAD, ENOB and the noise floor from a harmonic fit and the in-band power
 * of its residual. Definitions follow distortion.ts: harmonic powers are A_k²/2; THD+N is
 * relative to the total in-band signal (AES17 §6.3); SNR excludes harmonics; noise floor is
 * 10·log10(2·N) dBFS. A weighting is applied to the noise and harmonics only, never to the
 * fundamental or the reference (AES17 places the weighting filter in the noise path, after the
 * notch that removes the fundamental).
 * Harmonics at or above Nyquist are not folded back: they are simply absent from the fit, and
 * THD is null (with a warning) when none remains, so that "0 %" never passes a limit by accident.
 * @param fit the fit of `fitHarmonics`, or null when the record holds no dominant tone
 * @param noise audio-band power of the residual (see `createAudioBandPlan`)
 * @throws RangeError on a bad band or negative noise power
 * @see AES17-2020 §6.3 (THD+N) and its weighting filter; IEEE Std 1241-2010 §4.5 (THD), §4.6
 *   (SINAD, ENOB); W. Kester, Analog Devices MT-003 (SNR excluding harmonics)
 */
export function computeToneMeasures(fit: HarmonicFit | null, noise: AudioBandPower, bandHz: readonly [number, number]): ToneMeasuresResult {
  const fn = 'computeToneMeasures';
  precondition(bandHz[0] >= 0 && bandHz[1] > bandHz[0], fn, `band must satisfy 0 ≤ low < high (got ${bandHz[0]}…${bandHz[1]})`);
  precondition(noise.power >= 0 && noise.powerA >= 0, fn, `noise powers must be ≥ 0 (got ${noise.power}, ${noise.powerA})`);
  const warnings: string[] = [];
  const floor = dbOrNull(2 * noise.power);
  const floorA = dbOrNull(2 * noise.powerA);
  if (floor === null) warnings.push('The record holds no noise in the band (digital silence or an exact tone); the noise floor is not reported.');
  const result: ToneMeasuresResult = {
    tone: null,
    bandHz: [bandHz[0], bandHz[1]],
    noisePower: noise.power,
    noisePowerA: noise.powerA,
    noiseFloorDbfs: floor,
    noiseFloorDbfsA: floorA,
    warnings,
  };
  const first = fit?.components[0];
  if (!fit || !first || !(first.amplitude > 0)) {
    warnings.push('No dominant tone was found, so THD, THD+N, SNR, SINAD and ENOB are not reported.');
    return result;
  }
  if (!inBandInclusive(first.frequencyHz, bandHz)) {
    warnings.push(
      `The tone at ${first.frequencyHz.toFixed(2)} Hz lies outside the measurement band ${bandHz[0]}–${bandHz[1]} Hz, so THD, THD+N, SNR, SINAD and ENOB are not reported.`,
    );
    return result;
  }
  const rest = fit.components.slice(1);
  const p1 = first.amplitude ** 2 / 2;
  let harmonicsInBand = 0;
  let harmonicsInBandA = 0;
  for (const c of rest) {
    if (!inBandInclusive(c.frequencyHz, bandHz)) continue;
    const g = aWeightingGain(c.frequencyHz);
    harmonicsInBand += c.amplitude ** 2 / 2;
    harmonicsInBandA += (c.amplitude ** 2 / 2) * g * g;
  }
  let thdPercent: number | null = null;
  if (rest.length === 0) {
    warnings.push(`THD is not reported: no harmonic of ${first.frequencyHz.toFixed(2)} Hz lies below half the sample rate (harmonics above it are not folded back).`);
  } else {
    thdPercent = (100 * Math.sqrt(rest.reduce((s, c) => s + c.amplitude ** 2, 0))) / first.amplitude;
  }
  const distortion = noise.power + harmonicsInBand;
  const total = p1 + distortion;
  const sinadDb = 10 * Math.log10(p1 / distortion);
  result.tone = {
    fundamentalHz: first.frequencyHz,
    amplitude: first.amplitude,
    levelDbfs: 20 * Math.log10(first.amplitude),
    harmonics: rest,
    thdPercent,
    thdDb: thdPercent === null ? null : 20 * Math.log10(thdPercent / 100),
    thdnDb: 10 * Math.log10(distortion / total),
    thdnPercent: 100 * Math.sqrt(distortion / total),
    thdnDbA: 10 * Math.log10((noise.powerA + harmonicsInBandA) / total),
    snrDb: 10 * Math.log10(p1 / noise.power),
    snrDbA: 10 * Math.log10(p1 / noise.powerA),
    sinadDb,
    enob: (sinadDb - 1.76) / 6.02,
  };
  return result;
}

/**
 * AES17 dynamic range from the A-weighted THD+N of a −60 dBFS tone:
 * DR = −THD+N_A(dB) − L_total(dBFS), L_total = 10·log10(2·(P1 + N + H)) being the level of the
 * unweighted total signal the ratio refers to; this equals −10·log10(2·(N_A + H_A)), i.e. full
 * scale over the weighted noise and distortion present with the signal.
 * Null unless the fundamental lies within ±`levelToleranceDb` of −60 dBFS (the standard's stimulus).
 * @throws RangeError on a negative tolerance
 * @see AES17-2020 §6.4.1 (dynamic range: −60 dBFS, 997 Hz, A-weighted THD+N, 60 dB added)
 */
export function dynamicRangeDb(measures: ToneMeasuresResult, levelToleranceDb = 3): number | null {
  requirePositive(levelToleranceDb, 'dynamicRangeDb', 'levelToleranceDb');
  const tone = measures.tone;
  if (!tone || Math.abs(tone.levelDbfs + 60) > levelToleranceDb) return null;
  let h = 0;
  for (const c of tone.harmonics) if (inBandInclusive(c.frequencyHz, measures.bandHz)) h += c.amplitude ** 2 / 2;
  const total = tone.amplitude ** 2 / 2 + measures.noisePower + h;
  return -tone.thdnDbA - 10 * Math.log10(2 * total);
}
