import type { DISTORTION_METRICS, HARMONIC_METRICS, INTEGRITY_METRICS, TIMING_METRICS } from './masks.js';
import { LEVEL_METRICS, type CheckUnit, type MaskCheck } from './masks.js';

/**
 * The words people read for a check's metric, one table for every surface (editor, review
 * diff, mail, CLI): a name and the unit its min/max are written in. The slugs (`rms-dbfs`)
 * stay the stored format; they are never shown as labels.
 */

export type CheckMetric =
  | (typeof LEVEL_METRICS)[number]
  | (typeof DISTORTION_METRICS)[number]
  | (typeof TIMING_METRICS)[number]
  | (typeof INTEGRITY_METRICS)[number]
  | (typeof HARMONIC_METRICS)[number];

export interface MetricLabel {
  name: string;
  /** The unit of its min/max; null where it takes none (polarity). */
  unit: CheckUnit | null;
  /** Shown after the unit where the unit alone would mislead ("re fundamental"). */
  qualifier?: string;
}

export const METRIC_LABELS: Record<CheckMetric, MetricLabel> = {
  'rms-dbfs': { name: 'RMS level', unit: 'dBFS' },
  'peak-dbfs': { name: 'Peak level', unit: 'dBFS' },
  'crest-factor-db': { name: 'Crest factor', unit: 'dB' },
  'energy-parseval': { name: 'Engine self-test: energy agreement', unit: 'ratio' },
  'thd-percent': { name: 'THD', unit: '%' },
  'thdn-db': { name: 'THD+N', unit: 'dB' },
  'snr-db': { name: 'Signal-to-noise ratio', unit: 'dB' },
  'noise-floor-dbfs': { name: 'Noise floor', unit: 'dBFS' },
  'dynamic-range-db': { name: 'Dynamic range', unit: 'dB', qualifier: 'A-weighted' },
  'imd-smpte-percent': { name: 'Intermodulation, low + high tone', unit: '%' },
  'imd-dfd-percent': { name: 'Intermodulation, difference frequency', unit: '%' },
  'latency-ms': { name: 'Latency', unit: 'ms' },
  'inter-channel-delay-ms': { name: 'Delay between channels', unit: 'ms' },
  polarity: { name: 'Polarity', unit: null, qualifier: 'must be normal' },
  'clipped-samples': { name: 'Clipped samples', unit: 'count' },
  'dc-offset': { name: 'DC offset', unit: 'FS' },
  dropouts: { name: 'Dropouts', unit: 'count' },
  discontinuities: { name: 'Discontinuities', unit: 'count' },
  'thd-db': { name: 'THD per band', unit: 'dB', qualifier: 're fundamental' },
  'h2-db': { name: '2nd harmonic per band', unit: 'dB', qualifier: 're fundamental' },
  'h3-db': { name: '3rd harmonic per band', unit: 'dB', qualifier: 're fundamental' },
};

const UNIT_WORDS: Partial<Record<CheckUnit, string>> = { count: 'count', ratio: 'ratio', deg: '°' };

/** "RMS level (dBFS)", "THD+N (dB)", "Dynamic range (dB, A-weighted)", "Polarity (must be normal)"; an unknown slug as it is. */
export function metricLabel(metric: string): string {
  const label = (METRIC_LABELS as Record<string, MetricLabel | undefined>)[metric];
  if (!label) return metric;
  const unit = label.unit ? (UNIT_WORDS[label.unit] ?? label.unit) : null;
  const inBrackets = [unit, label.qualifier].filter(Boolean).join(', ');
  return inBrackets ? `${label.name} (${inBrackets})` : label.name;
}

/** The unit a metric's limits are written in ("dBFS" for rms-dbfs); null for none or an unknown slug. */
export function metricUnit(metric: string): CheckUnit | null {
  return (METRIC_LABELS as Record<string, MetricLabel | undefined>)[metric]?.unit ?? null;
}

/** A 1/N-octave designator in words: 6 → "1/6 octave", 1 → "1 octave"; absent → "none". */
export function smoothingLabel(fraction: number | null | undefined): string {
  if (fraction === null || fraction === undefined) return 'none';
  return fraction === 1 ? '1 octave' : `1/${fraction} octave`;
}

// ---------------------------------------------------------------------------------------------
// The engine's self-test is not an acceptance check

/**
 * Metrics that test the analysis itself rather than the firmware (Parseval: the energy in time
 * equals the energy in frequency). They cannot tell a good build from a bad one, so a new mask
 * revision may not hold them; masks stored before this rule keep being evaluated unchanged.
 */
export const ENGINE_SELF_TEST_METRICS = ['energy-parseval'] as const;

/** The level metrics an acceptance mask may use (the editor offers only these). */
export const ACCEPTANCE_LEVEL_METRICS = LEVEL_METRICS.filter((m) => !(ENGINE_SELF_TEST_METRICS as readonly string[]).includes(m));

/** Whether a check (stored or typed) is the engine's self-test. */
export function isEngineSelfTest(check: { kind?: unknown; metric?: unknown }): boolean {
  return check.kind === 'level' && (ENGINE_SELF_TEST_METRICS as readonly unknown[]).includes(check.metric);
}

export const SELF_TEST_REFUSAL = 'the engine self-test (energy agreement) checks the analysis, not the firmware, and cannot be part of an acceptance mask; remove this check';

/** One message per self-test check, at its metric (`checks.2.metric`), for the editor and the API alike. */
export function selfTestIssues(checks: readonly Pick<MaskCheck, 'kind'>[] | readonly { kind?: unknown; metric?: unknown }[]): { path: string; message: string }[] {
  return (checks as readonly { kind?: unknown; metric?: unknown }[]).flatMap((check, index) => (isEngineSelfTest(check) ? [{ path: `checks.${index}.metric`, message: SELF_TEST_REFUSAL }] : []));
}
