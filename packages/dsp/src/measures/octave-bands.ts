import { precondition, requirePositive } from '../util/preconditions.js';

/** Octave frequency ratio G = 10^(3/10) (base-10 system). @see IEC 61260-1:2014 §5.2 */
export const OCTAVE_RATIO = 10 ** 0.3;
/** Reference frequency f_r = 1000 Hz. @see IEC 61260-1:2014 §5.3 */
export const REFERENCE_FREQUENCY = 1000;

/** Bandwidth designators the engine supports: 1/b octave. */
export type OctaveFraction = 1 | 3 | 6 | 12;

/** One fractional-octave band. */
export interface OctaveBand {
  /** Band index x (0 for the band at or just above 1 kHz). */
  index: number;
  /** Exact mid-band frequency f_m. */
  centerHz: number;
  /** Nominal label: the IEC nominal value for 1/1 and 1/3 octaves, else 3 significant figures. */
  nominalHz: number;
  lowerHz: number;
  upperHz: number;
}

// Nominal 1/3-octave mid-band frequencies of one decade (IEC 61260-1:2014 annex E), ×10^k.
const THIRD_OCTAVE_DECADE = [100, 125, 160, 200, 250, 315, 400, 500, 630, 800];

function roundSignificant(v: number, digits: number): number {
  const p = 10 ** (digits - Math.ceil(Math.log10(v)));
  return Math.round(v * p) / p;
}

/** Nominal frequency of the 1/3-octave band with index y (y = 0 → 1000 Hz). */
function thirdOctaveNominal(y: number): number {
  const decade = Math.floor(y / 10);
  const idx = y - 10 * decade;
  // 1000·10^(y/10) = 100·10^(idx/10)·10^(decade+1); the table holds the decade starting at 100.
  return roundSignificant((THIRD_OCTAVE_DECADE[idx] as number) * 10 ** (decade + 1), 4);
}

/**
 * Mid-band frequency of band x for 1/b octave: odd b: f_r·G^(x/b); even b: f_r·G^((2x+1)/(2b)).
 * @throws RangeError for an unsupported b or non-integer x
 * @see IEC 61260-1:2014, §5.4, equations (2) and (3)
 */
export function octaveBandCenter(fraction: OctaveFraction, index: number): number {
  precondition([1, 3, 6, 12].includes(fraction), 'octaveBandCenter', `fraction must be 1, 3, 6 or 12 (got ${fraction})`);
  precondition(Number.isInteger(index), 'octaveBandCenter', `index must be an integer (got ${index})`);
  return fraction % 2 === 1 ? REFERENCE_FREQUENCY * OCTAVE_RATIO ** (index / fraction) : REFERENCE_FREQUENCY * OCTAVE_RATIO ** ((2 * index + 1) / (2 * fraction));
}

/**
 * All 1/b-octave bands whose exact mid-band frequency lies in [minHz, maxHz], with band
 * edges f_m·G^(±1/(2b)).
 * @throws RangeError for an unsupported fraction or a bad range
 * @see IEC 61260-1:2014, §5.4–5.5 (mid-band frequencies, band-edge frequencies), annex E (nominal values)
 */
export function fractionalOctaveBands(fraction: OctaveFraction, minHz: number, maxHz: number): OctaveBand[] {
  const fn = 'fractionalOctaveBands';
  precondition([1, 3, 6, 12].includes(fraction), fn, `fraction must be 1, 3, 6 or 12 (got ${fraction})`);
  requirePositive(minHz, fn, 'minHz');
  precondition(maxHz >= minHz, fn, `maxHz must be ≥ minHz (got ${minHz}…${maxHz})`);
  const edge = OCTAVE_RATIO ** (1 / (2 * fraction));
  const bands: OctaveBand[] = [];
  // Invert the centre formula to find the first index, then walk up.
  let x = Math.floor((fraction * Math.log(minHz / REFERENCE_FREQUENCY)) / Math.log(OCTAVE_RATIO)) - 2;
  for (;; x++) {
    const centerHz = octaveBandCenter(fraction, x);
    if (centerHz > maxHz * (1 + 1e-12)) break;
    if (centerHz < minHz * (1 - 1e-12)) continue;
    let nominalHz: number;
    if (fraction === 3) nominalHz = thirdOctaveNominal(x);
    else if (fraction === 1) nominalHz = thirdOctaveNominal(3 * x);
    else nominalHz = roundSignificant(centerHz, 3);
    bands.push({ index: x, centerHz, nominalHz, lowerHz: centerHz / edge, upperHz: centerHz * edge });
  }
  return bands;
}

/** A band level in dBFS. */
export interface BandLevel {
  band: OctaveBand;
  /** Mean-square power in the band (full-scale units²). */
  power: number;
  /** 10·log10(2·power) (AES17 dBFS); −Infinity when the band holds no power. */
  levelDbfs: number;
}

/**
 * Band levels from a one-sided power spectrum: each bin's mean-square power p_k at k·binHz is
 * summed over lowerHz ≤ f < upperHz. Bins are not split at the edges, so a band needs several
 * bins for a level within a fraction of a dB; callers choose a long enough FFT.
 * @throws RangeError on a non-positive bin spacing
 * @see IEC 61260-1:2014 §5.5 (band edges); power summation per bin as in Welch 1967
 */
export function bandLevels(power: Float64Array, binHz: number, bands: readonly OctaveBand[]): BandLevel[] {
  requirePositive(binHz, 'bandLevels', 'binHz');
  return bands.map((band) => {
    const k0 = Math.max(0, Math.ceil(band.lowerHz / binHz - 1e-9));
    const k1 = Math.min(power.length - 1, Math.ceil(band.upperHz / binHz - 1e-9) - 1);
    let p = 0;
    for (let k = k0; k <= k1; k++) p += power[k] as number;
    return { band, power: p, levelDbfs: 10 * Math.log10(2 * p) };
  });
}
