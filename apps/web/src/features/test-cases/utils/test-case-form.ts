import {
  formatFrequency,
  CreateTestCaseRequest,
  STIMULUS_KINDS,
  UpdateTestCaseRequest,
  type StimulusKind,
  type TestCaseDto,
} from '@earmark/contracts';
import { issuesByPath, type FieldIssues } from '@/lib/field-issues';

/**
 * The test-case form keeps what people type (strings, so "48 000" half-typed is not lost)
 * and turns it into a request only on save; the contracts' schemas then say what is wrong,
 * by path, with their own words.
 */

export type StimulusField = {
  name: string;
  label: string;
  unit?: string;
  type: 'number' | 'list' | 'select' | 'checkbox';
  options?: readonly { value: string; label: string }[];
  hint?: string;
  /** Blank uses the contract's default; this is shown as the placeholder. */
  placeholder?: string;
};

const sampleRate: StimulusField = { name: 'sampleRate', label: 'Sample rate', unit: 'Hz', type: 'number' };
const channels: StimulusField = { name: 'channels', label: 'Channels', type: 'number', placeholder: '1' };
const seconds: StimulusField = { name: 'seconds', label: 'Duration', unit: 's', type: 'number' };
const level: StimulusField = { name: 'levelDbfs', label: 'Level', unit: 'dBFS', type: 'number', placeholder: '-20', hint: 'At most 0 dBFS' };
const fadeIn: StimulusField = { name: 'fadeInSeconds', label: 'Fade in', unit: 's', type: 'number', placeholder: '0' };
const fadeOut: StimulusField = { name: 'fadeOutSeconds', label: 'Fade out', unit: 's', type: 'number', placeholder: '0' };
const seed: StimulusField = { name: 'seed', label: 'Seed', type: 'number', placeholder: '0' };

export const STIMULUS_KIND_LABELS: Record<StimulusKind, string> = {
  sine: 'Sine',
  multitone: 'Multitone',
  sweep: 'Exponential sweep',
  impulse: 'Impulse',
  'white-noise': 'White noise',
  'pink-noise': 'Pink noise',
  silence: 'Silence',
  'imd-smpte': 'Two-tone IMD (SMPTE/DIN)',
  'imd-twin-tone': 'Twin-tone IMD (difference frequency)',
};

export const STIMULUS_FIELDS: Record<StimulusKind, StimulusField[]> = {
  sine: [sampleRate, channels, seconds, level, { name: 'frequency', label: 'Frequency', unit: 'Hz', type: 'number' }, fadeIn, fadeOut],
  multitone: [
    sampleRate,
    channels,
    seconds,
    level,
    { name: 'frequencies', label: 'Tone frequencies', unit: 'Hz', type: 'list', hint: 'Comma-separated; or leave empty and give from, to and count' },
    { name: 'from', label: 'From', unit: 'Hz', type: 'number' },
    { name: 'to', label: 'To', unit: 'Hz', type: 'number' },
    { name: 'count', label: 'Tones', type: 'number' },
    {
      name: 'spacing',
      label: 'Spacing',
      type: 'select',
      options: [
        { value: 'log', label: 'Logarithmic' },
        { value: 'linear', label: 'Linear' },
      ],
    },
    {
      name: 'phases',
      label: 'Phases',
      type: 'select',
      options: [
        { value: 'schroeder', label: 'Schroeder (low crest factor)' },
        { value: 'random', label: 'Random (seeded)' },
      ],
    },
    seed,
    fadeIn,
    fadeOut,
  ],
  sweep: [
    sampleRate,
    channels,
    seconds,
    level,
    { name: 'from', label: 'From', unit: 'Hz', type: 'number' },
    { name: 'to', label: 'To', unit: 'Hz', type: 'number' },
    { name: 'silenceSeconds', label: 'Trailing silence', unit: 's', type: 'number', placeholder: '0' },
    fadeIn,
    fadeOut,
  ],
  impulse: [sampleRate, channels, seconds, { ...level, hint: 'Peak of the single sample; at most 0 dBFS' }, { name: 'delaySamples', label: 'Delay', unit: 'samples', type: 'number', placeholder: '0' }],
  'white-noise': [sampleRate, channels, seconds, level, seed, { name: 'independentChannels', label: 'Independent noise per channel', type: 'checkbox' }, fadeIn, fadeOut],
  'pink-noise': [sampleRate, channels, seconds, level, seed, { name: 'independentChannels', label: 'Independent noise per channel', type: 'checkbox' }, fadeIn, fadeOut],
  silence: [sampleRate, channels, seconds],
  'imd-smpte': [
    sampleRate,
    channels,
    seconds,
    { ...level, hint: 'Combined peak of both tones; at most 0 dBFS' },
    { name: 'lowFrequency', label: 'Low tone', unit: 'Hz', type: 'number', placeholder: '60' },
    { name: 'highFrequency', label: 'High tone', unit: 'Hz', type: 'number', placeholder: '7000' },
    { name: 'ratio', label: 'Amplitude ratio low:high', type: 'number', placeholder: '4' },
    fadeIn,
    fadeOut,
  ],
  'imd-twin-tone': [
    sampleRate,
    channels,
    seconds,
    { ...level, hint: 'Combined peak of both tones; at most 0 dBFS' },
    { name: 'lowFrequency', label: 'Lower tone', unit: 'Hz', type: 'number', placeholder: '18000' },
    { name: 'highFrequency', label: 'Upper tone', unit: 'Hz', type: 'number', placeholder: '19000' },
    fadeIn,
    fadeOut,
  ],
};

export type TestCaseFormValues = {
  key: string;
  name: string;
  description: string;
  kind: StimulusKind;
  /** Stimulus field values by name, as typed. */
  stimulus: Record<string, string | boolean>;
  transferMethod: '' | 'h1' | 'deconvolution';
  transferLo: string;
  transferHi: string;
  channelMap: string;
};

export function emptyTestCaseForm(): TestCaseFormValues {
  return {
    key: '',
    name: '',
    description: '',
    kind: 'sweep',
    stimulus: { sampleRate: '48000', seconds: '5', levelDbfs: '-20', from: '20', to: '20000' },
    transferMethod: '',
    transferLo: '',
    transferHi: '',
    channelMap: '',
  };
}

function listText(values: readonly number[]): string {
  return values.join(', ');
}

export function testCaseToForm(testCase: TestCaseDto): TestCaseFormValues {
  const stimulus: Record<string, string | boolean> = {};
  for (const [name, value] of Object.entries(testCase.stimulus)) {
    if (name === 'kind') continue;
    if (typeof value === 'boolean') stimulus[name] = value;
    else if (Array.isArray(value)) stimulus[name] = listText(value as number[]);
    else if (value !== undefined && value !== null) stimulus[name] = String(value);
  }
  return {
    key: testCase.key,
    name: testCase.name,
    description: testCase.description,
    kind: testCase.stimulus.kind,
    stimulus,
    transferMethod: testCase.analysis.transferMethod ?? '',
    transferLo: testCase.analysis.transferBandHz ? String(testCase.analysis.transferBandHz[0]) : '',
    transferHi: testCase.analysis.transferBandHz ? String(testCase.analysis.transferBandHz[1]) : '',
    channelMap: listText(testCase.channelMap),
  };
}

/** "48000" → 48000; "" → undefined (the default applies); anything else → NaN so the schema names it. */
function toNumber(text: string): number | undefined {
  const trimmed = text.trim().replace(/\u2212/g, '-');
  if (trimmed === '') return undefined;
  const value = Number(trimmed);
  return Number.isFinite(value) ? value : Number.NaN;
}

function toList(text: string): number[] | undefined {
  const parts = text
    .split(/[,\s;]+/)
    .map((part) => part.trim())
    .filter(Boolean);
  if (parts.length === 0) return undefined;
  return parts.map((part) => toNumber(part) ?? Number.NaN);
}

/** The stimulus spec as the API takes it: only this kind's fields, blanks left to the defaults. */
export function stimulusFromForm(values: TestCaseFormValues): Record<string, unknown> {
  const spec: Record<string, unknown> = { kind: values.kind };
  for (const field of STIMULUS_FIELDS[values.kind]) {
    const raw = values.stimulus[field.name];
    if (field.type === 'checkbox') {
      if (raw === true) spec[field.name] = true;
      continue;
    }
    if (typeof raw !== 'string' || raw.trim() === '') continue;
    if (field.type === 'select') spec[field.name] = raw;
    else if (field.type === 'list') spec[field.name] = toList(raw);
    else spec[field.name] = toNumber(raw);
  }
  return spec;
}

function analysisFromForm(values: TestCaseFormValues): Record<string, unknown> {
  const analysis: Record<string, unknown> = {};
  if (values.transferMethod) analysis.transferMethod = values.transferMethod;
  const lo = toNumber(values.transferLo);
  const hi = toNumber(values.transferHi);
  if (lo !== undefined || hi !== undefined) analysis.transferBandHz = [lo ?? Number.NaN, hi ?? Number.NaN];
  return analysis;
}

export type FormResult<T> = { ok: true; body: T } | { ok: false; issues: FieldIssues };

/** Checks the form against CreateTestCaseRequest; the body keeps what the user gave (defaults are the API's). */
export function createRequestFromForm(values: TestCaseFormValues): FormResult<CreateTestCaseRequest> {
  const raw = {
    key: values.key.trim(),
    name: values.name.trim(),
    description: values.description,
    stimulus: stimulusFromForm(values),
    analysis: analysisFromForm(values),
    channelMap: toList(values.channelMap) ?? [],
  };
  const parsed = CreateTestCaseRequest.safeParse(raw);
  if (!parsed.success) return { ok: false, issues: issuesByPath(parsed.error) };
  // Send what was typed, not the parsed copy with every default filled in: the stored spec
  // then reads as the person wrote it.
  return { ok: true, body: raw as CreateTestCaseRequest };
}

export function updateRequestFromForm(values: TestCaseFormValues): FormResult<UpdateTestCaseRequest> {
  const raw = {
    name: values.name.trim(),
    description: values.description,
    stimulus: stimulusFromForm(values),
    analysis: analysisFromForm(values),
    channelMap: toList(values.channelMap) ?? [],
  };
  const parsed = UpdateTestCaseRequest.safeParse(raw);
  if (!parsed.success) return { ok: false, issues: issuesByPath(parsed.error) };
  return { ok: true, body: raw as UpdateTestCaseRequest };
}

/**
 * Once a test case has captures only its name and description change here: its stimulus,
 * analysis settings and channel map are reviewed with a mask revision instead.
 */
export function renameRequestFromForm(values: TestCaseFormValues): FormResult<UpdateTestCaseRequest> {
  const raw = { name: values.name.trim(), description: values.description };
  const parsed = UpdateTestCaseRequest.safeParse(raw);
  if (!parsed.success) return { ok: false, issues: issuesByPath(parsed.error) };
  return { ok: true, body: raw };
}

export { STIMULUS_KINDS };

/** A one-line summary of a stimulus for the table: "Sweep 20 Hz–20 kHz, 5 s @ −20 dBFS". */
export function describeStimulus(spec: TestCaseDto['stimulus']): string {
  const rate = `${spec.sampleRate / 1000} kHz`;
  const levelText = 'levelDbfs' in spec ? `, ${String(spec.levelDbfs).replace('-', '\u2212')} dBFS` : '';
  const hz = formatFrequency;
  switch (spec.kind) {
    case 'sine':
      return `Sine ${hz(spec.frequency)}, ${spec.seconds} s${levelText} · ${rate}`;
    case 'multitone': {
      const tones = spec.frequencies ? `${spec.frequencies.length} tones` : `${spec.count ?? 0} tones ${hz(spec.from ?? 0)}–${hz(spec.to ?? 0)}`;
      return `Multitone ${tones}, ${spec.seconds} s${levelText} · ${rate}`;
    }
    case 'sweep':
      return `Sweep ${hz(spec.from)}–${hz(spec.to)}, ${spec.seconds} s${levelText} · ${rate}`;
    case 'impulse':
      return `Impulse, ${spec.seconds} s${levelText} · ${rate}`;
    case 'white-noise':
    case 'pink-noise':
      return `${STIMULUS_KIND_LABELS[spec.kind]}, ${spec.seconds} s${levelText} · ${rate}`;
    case 'silence':
      return `Silence, ${spec.seconds} s · ${rate}`;
    case 'imd-smpte':
      return `Two-tone IMD ${hz(spec.lowFrequency)} + ${hz(spec.highFrequency)} (${spec.ratio}:1), ${spec.seconds} s${levelText} · ${rate}`;
    case 'imd-twin-tone':
      return `Twin-tone IMD ${hz(spec.lowFrequency)} + ${hz(spec.highFrequency)}, ${spec.seconds} s${levelText} · ${rate}`;
  }
}
