import {
  ACCEPTANCE_LEVEL_METRICS,
  CHECK_KIND_LABELS,
  CHECK_KINDS,
  DISTORTION_METRICS,
  INTEGRITY_METRICS,
  MaskDocument,
  HARMONIC_METRICS,
  TIMING_METRICS,
  metricLabel,
  metricUnit,
  selfTestIssues,
  smoothingLabel,
  type CheckKind,
  type LimitPoint,
  type MaskCheck,
} from '@earmark/contracts';
import { issuesByPath, type FieldIssues } from '@/lib/field-issues';

/**
 * The table editor's model. People type into cells, so every value is kept as typed (a
 * half-written "-0." must survive a re-render) and turned into a check only to validate,
 * preview and save. The conversion keeps list positions, so the schema's issue paths
 * (`checks.2.upper.1.hz`) point straight at the cell that caused them.
 */

export type PointRow = { hz: string; db: string };
export type BandRow = { centerHz: string; min: string; max: string };

export type EditorCheck = {
  /** React key; stable across reorders, never sent. */
  uid: string;
  kind: CheckKind;
  /** Scalar fields by their schema name; tuple fields as `bandHz.0`, `bandHz.1`. */
  fields: Record<string, string>;
  upper: PointRow[] | null;
  lower: PointRow[] | null;
  bands: BandRow[];
};

export type FieldSpec = {
  /** Schema field, or `name.0`/`name.1` for a tuple's parts. */
  name: string;
  label: string;
  unit?: string;
  type: 'text' | 'number' | 'select' | 'list' | 'pairs';
  options?: readonly { value: string; label: string }[];
  placeholder?: string;
  /** min/max whose unit follows the check's metric ("dBFS" for an RMS level). */
  unitFromMetric?: boolean;
};

export { CHECK_KIND_LABELS };

/** Metrics by their labels with units ("RMS level (dBFS)"); the slug stays the stored value. */
const metricOptions = (values: readonly string[]) => values.map((value) => ({ value, label: metricLabel(value) }));
/** 1/N-octave designators in words ("1/6 octave"), never a bare "6". */
const fractionOptions = (values: readonly number[]) => values.map((value) => ({ value: String(value), label: smoothingLabel(value) }));
const measureOptions = [
  { value: 'transfer', label: 'Transfer function |H|' },
  { value: 'level', label: 'Level spectrum' },
];
const measure: FieldSpec = { name: 'measure', label: 'Measure', type: 'select', options: measureOptions };
const referenceHz: FieldSpec = { name: 'referenceHz', label: 'Reference', unit: 'Hz', type: 'number', placeholder: '1000' };
const min: FieldSpec = { name: 'min', label: 'Min', type: 'number', unitFromMetric: true };
const max: FieldSpec = { name: 'max', label: 'Max', type: 'number', unitFromMetric: true };
const band = (label: string): FieldSpec[] => [
  { name: 'bandHz.0', label: `${label} from`, unit: 'Hz', type: 'number', placeholder: 'auto' },
  { name: 'bandHz.1', label: `${label} to`, unit: 'Hz', type: 'number', placeholder: 'auto' },
];

/** Per kind, the fields the MaskCheck schema defines besides id, label, channels and the curve/band tables. */
export const KIND_FIELDS: Record<CheckKind, FieldSpec[]> = {
  'magnitude-envelope': [
    measure,
    referenceHz,
    { name: 'smoothing', label: 'Smoothing', type: 'select', options: [{ value: '', label: 'none' }, ...fractionOptions([1, 3, 6, 12, 24])] },
  ],
  'band-levels': [{ name: 'fraction', label: 'Bands', type: 'select', options: fractionOptions([1, 3, 6, 12]) }, measure, referenceHz],
  level: [
    // The engine's self-test (energy-parseval) is not offered: it is not an acceptance check.
    { name: 'metric', label: 'Metric', type: 'select', options: metricOptions(ACCEPTANCE_LEVEL_METRICS) },
    min,
    max,
    { name: 'timeSeconds.0', label: 'From', unit: 's', type: 'number', placeholder: 'start' },
    { name: 'timeSeconds.1', label: 'To', unit: 's', type: 'number', placeholder: 'end' },
  ],
  'phase-linearity': [
    ...band('Band'),
    { name: 'maxDeviationDeg', label: 'Max deviation', unit: '°', type: 'number' },
    { name: 'maxGroupDelayVariationMs', label: 'Max GD variation', unit: 'ms', type: 'number' },
  ],
  distortion: [
    { name: 'metric', label: 'Metric', type: 'select', options: metricOptions(DISTORTION_METRICS) },
    min,
    max,
    { name: 'weighting', label: 'Weighting', type: 'select', options: [{ value: '', label: 'default' }, { value: 'none', label: 'none' }, { value: 'a', label: 'A' }] },
    ...band('Band'),
  ],
  timing: [
    { name: 'metric', label: 'Metric', type: 'select', options: metricOptions(TIMING_METRICS) },
    min,
    max,
    { name: 'pairs', label: 'Pairs', type: 'pairs', placeholder: '0-1, 0-2' },
  ],
  integrity: [
    { name: 'metric', label: 'Metric', type: 'select', options: metricOptions(INTEGRITY_METRICS) },
    max,
    { name: 'clipThreshold', label: 'Clip threshold', unit: 'FS', type: 'number' },
    { name: 'minDropoutMs', label: 'Min dropout', unit: 'ms', type: 'number' },
  ],
  'distortion-vs-frequency': [{ name: 'metric', label: 'Metric', type: 'select', options: metricOptions(HARMONIC_METRICS) }],
  coherence: [...band('Band'), { name: 'min', label: 'Min coherence γ²', type: 'number' }],
  crosstalk: [
    { name: 'drivenChannel', label: 'Driven channel', type: 'number' },
    { name: 'minDb', label: 'Min separation', unit: 'dB', type: 'number' },
    ...band('Band'),
  ],
};

export { CHECK_KINDS };

/** The unit a field is shown in: its own, or for min/max the unit of the check's metric. */
export function fieldUnit(spec: FieldSpec, check: EditorCheck): string | undefined {
  if (!spec.unitFromMetric) return spec.unit;
  const unit = metricUnit(check.fields.metric ?? '');
  if (unit === null || unit === 'ratio') return undefined;
  return unit === 'deg' ? '°' : unit;
}

/** A select's value in words for read-only display (the option's label, else the value as stored). */
export function optionLabel(spec: FieldSpec, value: string): string {
  if (spec.name === 'metric' && value) return metricLabel(value);
  return spec.options?.find((o) => o.value === value)?.label ?? value;
}

let uidCounter = 0;
export function newUid(): string {
  uidCounter += 1;
  return `c${uidCounter}`;
}

/** A fresh check of a kind with sensible starting values (valid as it stands, except its id if taken). */
export function starterCheck(kind: CheckKind, id: string): EditorCheck {
  const base = { uid: newUid(), kind, upper: null, lower: null, bands: [] as BandRow[] };
  switch (kind) {
    case 'magnitude-envelope':
      return {
        ...base,
        fields: { id, measure: 'transfer', smoothing: '6' },
        upper: [
          { hz: '20', db: '1' },
          { hz: '20000', db: '1' },
        ],
        lower: [
          { hz: '20', db: '-1' },
          { hz: '20000', db: '-1' },
        ],
      };
    case 'band-levels':
      return { ...base, fields: { id, fraction: '3', measure: 'level' }, bands: [{ centerHz: '1000', min: '', max: '-100' }] };
    case 'level':
      return { ...base, fields: { id, metric: 'rms-dbfs', min: '-21', max: '-19' } };
    case 'phase-linearity':
      return { ...base, fields: { id, maxDeviationDeg: '5' } };
    case 'distortion':
      return { ...base, fields: { id, metric: 'thd-percent', max: '0.1' } };
    case 'timing':
      return { ...base, fields: { id, metric: 'latency-ms', min: '0', max: '10' } };
    case 'integrity':
      return { ...base, fields: { id, metric: 'clipped-samples', max: '0' } };
    case 'distortion-vs-frequency':
      return {
        ...base,
        fields: { id, metric: 'thd-db' },
        upper: [
          { hz: '50', db: '-40' },
          { hz: '10000', db: '-54' },
        ],
      };
    case 'coherence':
      return { ...base, fields: { id, min: '0.98' } };
    case 'crosstalk':
      return { ...base, fields: { id, drivenChannel: '0', minDb: '70' } };
  }
}

function text(value: unknown): string {
  return value === undefined || value === null ? '' : String(value);
}

/** A stored check as editor rows. */
export function toEditorCheck(check: MaskCheck): EditorCheck {
  const fields: Record<string, string> = {};
  let upper: PointRow[] | null = null;
  let lower: PointRow[] | null = null;
  let bands: BandRow[] = [];
  for (const [name, value] of Object.entries(check)) {
    if (name === 'kind') continue;
    if (check.kind === 'distortion-vs-frequency' && name === 'max') {
      upper = (value as LimitPoint[]).map((p) => ({ hz: text(p.hz), db: text(p.db) }));
    } else if (name === 'upper' || name === 'lower') {
      const rows = (value as LimitPoint[]).map((p) => ({ hz: text(p.hz), db: text(p.db) }));
      if (name === 'upper') upper = rows;
      else lower = rows;
    } else if (name === 'bands') {
      bands = (value as { centerHz: number; min?: number; max?: number }[]).map((b) => ({ centerHz: text(b.centerHz), min: text(b.min), max: text(b.max) }));
    } else if (name === 'channels') {
      fields.channels = (value as number[]).join(', ');
    } else if (name === 'pairs') {
      fields.pairs = (value as [number, number][]).map(([a, b]) => `${a}-${b}`).join(', ');
    } else if (name === 'bandHz' || name === 'timeSeconds') {
      const [a, b] = value as [number, number];
      fields[`${name}.0`] = text(a);
      fields[`${name}.1`] = text(b);
    } else if (name === 'referenceHz' && value === null) {
      fields.referenceHz = 'none';
    } else {
      fields[name] = text(value);
    }
  }
  return { uid: newUid(), kind: check.kind, fields, upper, lower, bands };
}

/** "12.5" → 12.5, "" → undefined, "abc" → NaN (so the schema says "expected number" at that cell). */
function num(raw: string | undefined): number | undefined {
  const trimmed = (raw ?? '').trim().replace(/\u2212/g, '-');
  if (trimmed === '') return undefined;
  const value = Number(trimmed);
  return Number.isFinite(value) ? value : Number.NaN;
}

function numList(raw: string | undefined): number[] | undefined {
  const parts = (raw ?? '').split(/[,\s;]+/).filter(Boolean);
  return parts.length ? parts.map((part) => num(part) ?? Number.NaN) : undefined;
}

function pairList(raw: string | undefined): [number, number][] | undefined {
  const parts = (raw ?? '').split(/[,;]+/).map((p) => p.trim()).filter(Boolean);
  if (!parts.length) return undefined;
  return parts.map((part) => {
    const [a, b] = part.split(/[-–:>\s]+/).filter(Boolean);
    return [num(a) ?? Number.NaN, num(b) ?? Number.NaN];
  });
}

/** The check as the API takes it; blanks are left out so the schema's defaults and rules apply. */
export function toCheckInput(check: EditorCheck): Record<string, unknown> {
  const out: Record<string, unknown> = { kind: check.kind, id: (check.fields.id ?? '').trim() };
  const label = (check.fields.label ?? '').trim();
  if (label) out.label = label;
  const channels = numList(check.fields.channels);
  if (channels) out.channels = channels;
  for (const spec of KIND_FIELDS[check.kind]) {
    const raw = check.fields[spec.name] ?? '';
    if (spec.name.endsWith('.0') || spec.name.endsWith('.1')) continue;
    if (raw.trim() === '') continue;
    if (spec.name === 'referenceHz' && raw.trim().toLowerCase() === 'none') out.referenceHz = null;
    else if (spec.type === 'pairs') out.pairs = pairList(raw);
    else if (spec.type === 'select') out[spec.name] = /^\d+$/.test(raw) ? Number(raw) : raw;
    else if (spec.type === 'number') out[spec.name] = num(raw);
    else out[spec.name] = raw;
  }
  for (const tuple of ['bandHz', 'timeSeconds']) {
    const a = check.fields[`${tuple}.0`] ?? '';
    const b = check.fields[`${tuple}.1`] ?? '';
    if (KIND_FIELDS[check.kind].some((f) => f.name === `${tuple}.0`) && (a.trim() || b.trim())) {
      out[tuple] = [num(a) ?? Number.NaN, num(b) ?? Number.NaN];
    }
  }
  if (check.kind === 'magnitude-envelope') {
    if (check.upper) out.upper = check.upper.map((p) => ({ hz: num(p.hz) ?? Number.NaN, db: num(p.db) ?? Number.NaN }));
    if (check.lower) out.lower = check.lower.map((p) => ({ hz: num(p.hz) ?? Number.NaN, db: num(p.db) ?? Number.NaN }));
  }
  if (check.kind === 'distortion-vs-frequency' && check.upper) out.max = check.upper.map((p) => ({ hz: num(p.hz) ?? Number.NaN, db: num(p.db) ?? Number.NaN }));
  if (check.kind === 'band-levels') {
    out.bands = check.bands.map((b) => {
      const row: Record<string, number> = { centerHz: num(b.centerHz) ?? Number.NaN };
      const lo = num(b.min);
      const hi = num(b.max);
      if (lo !== undefined) row.min = lo;
      if (hi !== undefined) row.max = hi;
      return row;
    });
  }
  return out;
}

export type Validation = { ok: true; checks: MaskCheck[] } | { ok: false; issues: FieldIssues };

/** The whole draft against MaskDocument: every message keyed by its path (`checks.0.upper.1.hz`). */
export function validateChecks(checks: readonly EditorCheck[]): Validation {
  const inputs = checks.map(toCheckInput);
  const parsed = MaskDocument.safeParse({ checks: inputs });
  // The API refuses the engine's self-test in a new revision; say so at its cell before saving.
  const selfTests = selfTestIssues(inputs);
  if (parsed.success && selfTests.length === 0) return { ok: true, checks: parsed.data.checks };
  const issues = parsed.success ? {} : issuesByPath(parsed.error);
  for (const { path, message } of selfTests) issues[path] = [...(issues[path] ?? []), message];
  // zod words a NaN as "expected number, received NaN"; say it the way a person typed it.
  for (const messages of Object.values(issues)) {
    messages.forEach((message, i) => {
      if (/received NaN/i.test(message)) messages[i] = 'must be a number';
    });
  }
  return { ok: false, issues };
}

/** The points of a typed limit curve that can be drawn (numbers, positive frequency), in order. */
export function drawablePoints(rows: readonly PointRow[] | null): LimitPoint[] | null {
  if (!rows) return null;
  const points = rows
    .map((row) => ({ hz: num(row.hz), db: num(row.db) }))
    .filter((p): p is LimitPoint => p.hz !== undefined && p.db !== undefined && Number.isFinite(p.hz) && Number.isFinite(p.db) && p.hz > 0);
  return points.length >= 2 ? points : null;
}

/** An id not yet used in the draft: `kind`, `kind-2`, … */
export function freeId(checks: readonly EditorCheck[], stem: string): string {
  const taken = new Set(checks.map((c) => (c.fields.id ?? '').trim()));
  if (!taken.has(stem)) return stem;
  for (let n = 2; ; n++) if (!taken.has(`${stem}-${n}`)) return `${stem}-${n}`;
}

/** Moves the item at `from` to `to`, returning a new array. */
export function move<T>(items: readonly T[], from: number, to: number): T[] {
  const next = [...items];
  const [item] = next.splice(from, 1);
  if (item === undefined || to < 0 || to > next.length) return [...items];
  next.splice(to, 0, item);
  return next;
}
