import { metricLabel, metricUnit, smoothingLabel } from './check-labels.js';
import { formatFrequency, formatNumberIn, formatQuantity } from './format/quantities.js';
import type { CheckKind } from './masks.js';
import type { CheckDiff } from './mask-workflow.js';

/**
 * A mask diff in words, for reviewers: "upper limit at 8 kHz: +1.50 → +1.00 dB" instead of
 * `upper.0.db`. It reads the whole checks on both sides (not the changed paths), so a limit
 * point is named by its frequency and a value by its check's unit. Pure; every number goes
 * through the shared formatter.
 */

export const CHECK_KIND_LABELS: Record<CheckKind, string> = {
  'magnitude-envelope': 'Magnitude envelope',
  'band-levels': 'Band levels',
  level: 'Level',
  'phase-linearity': 'Phase linearity',
  distortion: 'Distortion and noise',
  timing: 'Timing',
  integrity: 'Time-domain integrity',
  'distortion-vs-frequency': 'Distortion vs frequency',
  coherence: 'Coherence',
  crosstalk: 'Crosstalk',
};

type Check = Record<string, unknown>;
type Point = { hz: number; db: number };
type Band = { centerHz: number; min?: number; max?: number };

const ARROW = ' → ';
const isNumber = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);
const kindLabel = (kind: unknown) => CHECK_KIND_LABELS[kind as CheckKind] ?? String(kind);

/** A limit value with its sign always shown ("+1.50", "−100.00"), since limits sit either side of zero. */
const signed = (value: unknown, unit: string | null) => (isNumber(value) ? formatNumberIn(value, unit, true) : 'none');
const plain = (value: unknown, unit: string | null) => (isNumber(value) ? formatNumberIn(value, unit) : 'none');
/** "before → after unit": the unit once, at the end, as people write a change. */
function change(before: string, after: string, unit: string | null): string {
  const suffix = unit && unit !== 'count' && unit !== 'ratio' ? (unit === 'deg' ? '°' : ` ${unit}`) : '';
  return `${before}${ARROW}${after}${after === 'none' ? '' : suffix}`;
}

/** The unit a spectral check's limits are in: dB on |H|, dBFS on the level spectrum. */
const spectralUnit = (check: Check | null) => (check?.measure === 'level' ? 'dBFS' : 'dB');

/** Unit of a check's min/max, from its metric or its kind. */
function limitUnit(check: Check | null): string | null {
  if (!check) return null;
  if (typeof check.metric === 'string') return metricUnit(check.metric);
  if (check.kind === 'coherence') return 'ratio';
  return null;
}

function curveSentences(name: string, before: Point[] | undefined, after: Point[] | undefined, unit: string): string[] {
  if (!before && !after) return [];
  const span = (points: Point[]) => `${formatFrequency(points[0]?.hz)} to ${formatFrequency(points[points.length - 1]?.hz)}`;
  if (!before && after) return [`${name} added: ${after.length} points, ${span(after)}`];
  if (before && !after) return [`${name} removed`];
  const old = new Map((before ?? []).map((p) => [p.hz, p.db]));
  const now = new Map((after ?? []).map((p) => [p.hz, p.db]));
  const out: string[] = [];
  for (const hz of [...new Set([...old.keys(), ...now.keys()])].sort((a, b) => a - b)) {
    const was = old.get(hz);
    const is = now.get(hz);
    if (was !== undefined && is !== undefined && was !== is) out.push(`${name} at ${formatFrequency(hz)}: ${change(signed(was, unit), signed(is, unit), unit)}`);
    else if (was === undefined && is !== undefined) out.push(`${name}: point added at ${formatFrequency(hz)}, ${signed(is, unit)} ${unit}`);
    else if (was !== undefined && is === undefined) out.push(`${name}: point at ${formatFrequency(hz)} removed (was ${signed(was, unit)} ${unit})`);
  }
  return out;
}

function bandSentences(before: Band[], after: Band[], unit: string): string[] {
  const old = new Map(before.map((b) => [b.centerHz, b]));
  const now = new Map(after.map((b) => [b.centerHz, b]));
  const out: string[] = [];
  for (const hz of [...new Set([...old.keys(), ...now.keys()])].sort((a, b) => a - b)) {
    const was = old.get(hz);
    const is = now.get(hz);
    const where = `band at ${formatFrequency(hz)}`;
    if (!was && is) out.push(`${where} added (${['min', 'max'].filter((k) => isNumber(is[k as 'min'])).map((k) => `${k} ${signed(is[k as 'min'], unit)} ${unit}`).join(', ')})`);
    else if (was && !is) out.push(`${where} removed`);
    else if (was && is) {
      for (const side of ['min', 'max'] as const) {
        if (was[side] !== is[side]) out.push(`${where}, ${side}: ${change(signed(was[side], unit), signed(is[side], unit), unit)}`);
      }
    }
  }
  return out;
}

const rangeText = (range: unknown, format: (v: number) => string, absent: string) =>
  Array.isArray(range) && isNumber(range[0]) && isNumber(range[1]) ? `${format(range[0])} to ${format(range[1])}` : absent;

const quoted = (v: unknown) => (typeof v === 'string' && v !== '' ? `“${v}”` : 'none');
const MEASURES: Record<string, string> = { transfer: 'transfer function |H|', level: 'level spectrum' };
const WEIGHTINGS: Record<string, string> = { none: 'none', a: 'A-weighted' };

/** Field → (before, after, the other check's context) → one sentence, for every scalar field a check can hold. */
const FIELD_SENTENCES: Record<string, (was: unknown, is: unknown, before: Check, after: Check) => string> = {
  label: (was, is) => `label: ${quoted(was)}${ARROW}${quoted(is)}`,
  metric: (was, is) => `metric: ${metricLabel(String(was))}${ARROW}${metricLabel(String(is))}`,
  measure: (was, is) => `measure: ${MEASURES[String(was)] ?? String(was)}${ARROW}${MEASURES[String(is)] ?? String(is)}`,
  referenceHz: (was, is) => {
    const show = (v: unknown) => (v === null ? 'none (absolute gain)' : isNumber(v) ? formatFrequency(v) : '1 kHz (default)');
    return `reference frequency: ${show(was)}${ARROW}${show(is)}`;
  },
  smoothing: (was, is) => `smoothing: ${smoothingLabel(was as number | undefined)}${ARROW}${smoothingLabel(is as number | undefined)}`,
  fraction: (was, is) => `bands: ${smoothingLabel(was as number)}${ARROW}${smoothingLabel(is as number)}`,
  channels: (was, is) => `channels: ${Array.isArray(was) ? was.join(', ') : 'all'}${ARROW}${Array.isArray(is) ? is.join(', ') : 'all'}`,
  min: (was, is, before, after) => `min: ${change(plain(was, limitUnit(before)), plain(is, limitUnit(after)), limitUnit(after))}`,
  max: (was, is, before, after) => `max: ${change(plain(was, limitUnit(before)), plain(is, limitUnit(after)), limitUnit(after))}`,
  bandHz: (was, is) => `band: ${rangeText(was, formatFrequency, 'default')}${ARROW}${rangeText(is, formatFrequency, 'default')}`,
  timeSeconds: (was, is) => `time range: ${rangeText(was, (v) => formatQuantity(v, 's'), 'whole capture')}${ARROW}${rangeText(is, (v) => formatQuantity(v, 's'), 'whole capture')}`,
  maxDeviationDeg: (was, is) => `max phase deviation: ${change(plain(was, 'deg'), plain(is, 'deg'), 'deg')}`,
  maxGroupDelayVariationMs: (was, is) => `max group-delay variation: ${change(plain(was, 'ms'), plain(is, 'ms'), 'ms')}`,
  weighting: (was, is) => `weighting: ${WEIGHTINGS[String(was)] ?? 'default'}${ARROW}${WEIGHTINGS[String(is)] ?? 'default'}`,
  pairs: (was, is) => {
    const show = (v: unknown) => (Array.isArray(v) ? (v as [number, number][]).map(([a, b]) => `${a} to ${b}`).join(', ') : 'default');
    return `channel pairs: ${show(was)}${ARROW}${show(is)}`;
  },
  clipThreshold: (was, is) => `clip threshold: ${change(plain(was, 'FS'), plain(is, 'FS'), 'FS')}`,
  minDropoutMs: (was, is) => `shortest dropout: ${change(plain(was, 'ms'), plain(is, 'ms'), 'ms')}`,
  drivenChannel: (was, is) => `driven channel: ${String(was ?? 'none')}${ARROW}${String(is ?? 'none')}`,
  minDb: (was, is) => `min separation: ${change(plain(was, 'dB'), plain(is, 'dB'), 'dB')}`,
};

/** What changed in one check, one sentence per change; an added or removed check is one sentence. */
export function describeCheckDiff(diff: Pick<CheckDiff, 'kind' | 'status' | 'before' | 'after'>): string[] {
  const { before, after } = diff;
  if (diff.status === 'unchanged') return [];
  if (diff.status === 'added' || !before) return [`new ${kindLabel(after?.kind ?? diff.kind).toLowerCase()} check`];
  if (diff.status === 'removed' || !after) return [`${kindLabel(before.kind).toLowerCase()} check removed`];
  if (before.kind !== after.kind) return [`kind: ${kindLabel(before.kind)}${ARROW}${kindLabel(after.kind)} (the check was replaced)`];

  const out: string[] = [];
  for (const field of [...new Set([...Object.keys(before), ...Object.keys(after)])]) {
    if (field === 'kind' || field === 'id' || same(before[field], after[field])) continue;
    if (field === 'upper' || field === 'lower') {
      out.push(...curveSentences(`${field} limit`, before[field] as Point[] | undefined, after[field] as Point[] | undefined, spectralUnit(after)));
    } else if (field === 'max' && after.kind === 'distortion-vs-frequency') {
      out.push(...curveSentences('upper limit', before.max as Point[] | undefined, after.max as Point[] | undefined, 'dB'));
    } else if (field === 'bands') {
      out.push(...bandSentences((before.bands as Band[] | undefined) ?? [], (after.bands as Band[] | undefined) ?? [], spectralUnit(after)));
    } else {
      const sentence = FIELD_SENTENCES[field];
      out.push(sentence ? sentence(before[field], after[field], before, after) : `${field}: ${JSON.stringify(before[field]) ?? 'none'}${ARROW}${JSON.stringify(after[field]) ?? 'none'}`);
    }
  }
  return out;
}
