import { z } from 'zod';

/**
 * Stimulus specs: the JSON a test case stores to describe its deterministic test signal.
 *
 * Levels are in dBFS with the AES17 convention: a full-scale sine reads 0 dBFS, so a sine
 * at L dBFS has amplitude 10^(L/20) and any other signal at L dBFS has an RMS of
 * 10^(L/20)/√2. An impulse's level is its peak. Levels above 0 dBFS are refused.
 * See docs/stimuli.md.
 */

/** Lowest and highest sample rates Earmark accepts anywhere (Hz). */
export const MIN_SAMPLE_RATE = 8000;
export const MAX_SAMPLE_RATE = 192000;
/** Most channels a stimulus or a capture may have. */
export const MAX_CHANNELS = 8;
/** Longest stimulus, in seconds of audio (sweep plus trailing silence). */
export const MAX_STIMULUS_SECONDS = 600;
/**
 * Most samples (seconds × sampleRate × channels) a stimulus may render to: 2^24 = 16,777,216,
 * i.e. 87.4 s of mono or 10.9 s of 8 channels at 192 kHz, 349 s of mono at 48 kHz. Rendering
 * holds each sample as a Float64 (128 MiB at the limit) plus the encoded file, so larger specs
 * would cost gigabytes on every download and judgement.
 */
export const MAX_STIMULUS_SAMPLES = 2 ** 24;
/** Most tones a multitone may hold. */
export const MAX_MULTITONE_TONES = 4096;

const SampleRate = z
  .number()
  .int('must be a whole number of hertz')
  .min(MIN_SAMPLE_RATE, `must be at least ${MIN_SAMPLE_RATE} Hz`)
  .max(MAX_SAMPLE_RATE, `must be at most ${MAX_SAMPLE_RATE} Hz`);
const Seconds = z
  .number()
  .positive('must be greater than 0 s')
  .max(MAX_STIMULUS_SECONDS, `must be at most ${MAX_STIMULUS_SECONDS} s`);
const Channels = z
  .number()
  .int('must be a whole number')
  .min(1, 'must be at least 1')
  .max(MAX_CHANNELS, `must be at most ${MAX_CHANNELS}`);
const LevelDbfs = z
  .number()
  .max(0, 'levels above 0 dBFS are refused: Earmark never writes a stimulus louder than full scale')
  .min(-200, 'must be at least -200 dBFS');
const Frequency = z.number().positive('must be greater than 0 Hz');
const FadeSeconds = z.number().min(0, 'must be 0 s or more');
const Seed = z
  .number()
  .int('must be a whole number')
  .min(0, 'must be 0 or more')
  .max(Number.MAX_SAFE_INTEGER, 'must be a safe integer');

const base = {
  sampleRate: SampleRate,
  channels: Channels.default(1),
};
const fades = {
  fadeInSeconds: FadeSeconds.default(0),
  fadeOutSeconds: FadeSeconds.default(0),
};

/** Samples a spec renders to: its whole duration (a sweep's trailing silence included) × rate × channels. */
export function stimulusSampleCount(s: { seconds: number; sampleRate: number; channels: number; silenceSeconds?: number }): number {
  return Math.round((s.seconds + (s.silenceSeconds ?? 0)) * s.sampleRate) * s.channels;
}

/** Refines a spec so it renders to at most MAX_STIMULUS_SAMPLES samples; the message names both counts. */
function checkSampleBudget(
  s: { seconds: number; sampleRate: number; channels: number; silenceSeconds?: number },
  ctx: z.RefinementCtx,
): void {
  const samples = stimulusSampleCount(s);
  if (samples <= MAX_STIMULUS_SAMPLES) return;
  ctx.addIssue({
    code: 'custom',
    path: ['seconds'],
    message: `the stimulus would render ${samples.toLocaleString('en-US')} samples (seconds × sampleRate × channels); at most ${MAX_STIMULUS_SAMPLES.toLocaleString('en-US')} are allowed — shorten it or use fewer channels`,
  });
}

function nyquistMessage(what: string): string {
  return `${what} must be below half the sample rate (the Nyquist frequency)`;
}

export const SineSpec = z
  .strictObject({
    kind: z.literal('sine'),
    ...base,
    seconds: Seconds,
    levelDbfs: LevelDbfs.default(-20),
    frequency: Frequency,
    ...fades,
  })
  .refine((s) => s.frequency < s.sampleRate / 2, { message: nyquistMessage('frequency'), path: ['frequency'] })
  .refine((s) => s.fadeInSeconds + s.fadeOutSeconds <= s.seconds, {
    message: 'fades together must not be longer than the signal',
    path: ['fadeInSeconds'],
  })
  .superRefine(checkSampleBudget);
export type SineSpec = z.infer<typeof SineSpec>;

export const MultitoneSpec = z
  .strictObject({
    kind: z.literal('multitone'),
    ...base,
    seconds: Seconds,
    levelDbfs: LevelDbfs.default(-20),
    /** Explicit tone frequencies (Hz); or give from/to/count instead. */
    frequencies: z.array(Frequency).min(1).max(MAX_MULTITONE_TONES).optional(),
    from: Frequency.optional(),
    to: Frequency.optional(),
    count: z.number().int().min(1).max(MAX_MULTITONE_TONES).optional(),
    spacing: z.enum(['log', 'linear']).default('log'),
    /** 'schroeder' (low crest factor, M. R. Schroeder 1970) or seeded 'random' phases. */
    phases: z.enum(['schroeder', 'random']).default('schroeder'),
    seed: Seed.default(0),
    ...fades,
  })
  .refine((s) => (s.frequencies !== undefined) !== (s.from !== undefined || s.to !== undefined || s.count !== undefined), {
    message: 'give either frequencies, or from, to and count',
    path: ['frequencies'],
  })
  .refine((s) => s.frequencies !== undefined || (s.from !== undefined && s.to !== undefined && s.count !== undefined), {
    message: 'from, to and count go together',
    path: ['count'],
  })
  .refine((s) => s.from === undefined || s.to === undefined || s.count === 1 || s.from < s.to, {
    message: 'from must be below to',
    path: ['from'],
  })
  .refine((s) => (s.frequencies ?? [s.to ?? 0]).every((f) => f < s.sampleRate / 2), {
    message: nyquistMessage('every tone'),
    path: ['frequencies'],
  })
  .refine((s) => s.fadeInSeconds + s.fadeOutSeconds <= s.seconds, {
    message: 'fades together must not be longer than the signal',
    path: ['fadeInSeconds'],
  })
  .superRefine(checkSampleBudget);
export type MultitoneSpec = z.infer<typeof MultitoneSpec>;

export const SweepSpec = z
  .strictObject({
    kind: z.literal('sweep'),
    ...base,
    /** Duration of the sweep itself; trailing silence comes on top. */
    seconds: Seconds,
    levelDbfs: LevelDbfs.default(-20),
    from: Frequency,
    to: Frequency,
    silenceSeconds: z.number().min(0, 'must be 0 s or more').max(MAX_STIMULUS_SECONDS).default(0),
    ...fades,
  })
  .refine((s) => s.from < s.to, { message: 'from must be below to', path: ['from'] })
  .refine((s) => s.to < s.sampleRate / 2, { message: nyquistMessage('to'), path: ['to'] })
  .refine((s) => s.fadeInSeconds + s.fadeOutSeconds <= s.seconds, {
    message: 'fades together must not be longer than the sweep',
    path: ['fadeInSeconds'],
  })
  .refine((s) => s.seconds + s.silenceSeconds <= MAX_STIMULUS_SECONDS, {
    message: `sweep plus silence must be at most ${MAX_STIMULUS_SECONDS} s`,
    path: ['silenceSeconds'],
  })
  .superRefine(checkSampleBudget);
export type SweepSpec = z.infer<typeof SweepSpec>;

export const ImpulseSpec = z
  .strictObject({
    kind: z.literal('impulse'),
    ...base,
    seconds: Seconds,
    /** Peak level of the single non-zero sample. */
    levelDbfs: LevelDbfs.default(-20),
    delaySamples: z.number().int().min(0, 'must be 0 or more').default(0),
  })
  .refine((s) => s.delaySamples < Math.round(s.seconds * s.sampleRate), {
    message: 'the impulse must fall inside the signal',
    path: ['delaySamples'],
  })
  .superRefine(checkSampleBudget);
export type ImpulseSpec = z.infer<typeof ImpulseSpec>;

const noise = {
  ...base,
  seconds: Seconds,
  levelDbfs: LevelDbfs.default(-20),
  seed: Seed.default(0),
  /** false: every channel carries the same noise; true: each channel its own stream. */
  independentChannels: z.boolean().default(false),
  ...fades,
};

export const WhiteNoiseSpec = z
  .strictObject({ kind: z.literal('white-noise'), ...noise })
  .refine((s) => s.fadeInSeconds + s.fadeOutSeconds <= s.seconds, {
    message: 'fades together must not be longer than the signal',
    path: ['fadeInSeconds'],
  })
  .superRefine(checkSampleBudget);
export type WhiteNoiseSpec = z.infer<typeof WhiteNoiseSpec>;

export const PinkNoiseSpec = z
  .strictObject({ kind: z.literal('pink-noise'), ...noise })
  .refine((s) => s.fadeInSeconds + s.fadeOutSeconds <= s.seconds, {
    message: 'fades together must not be longer than the signal',
    path: ['fadeInSeconds'],
  })
  .superRefine(checkSampleBudget);
export type PinkNoiseSpec = z.infer<typeof PinkNoiseSpec>;

export const SilenceSpec = z
  .strictObject({ kind: z.literal('silence'), ...base, seconds: Seconds })
  .superRefine(checkSampleBudget);
export type SilenceSpec = z.infer<typeof SilenceSpec>;

/** Most an SMPTE/DIN amplitude ratio (low tone : high tone) may be, either way. */
export const MAX_IMD_RATIO = 100;

/**
 * SMPTE / DIN intermodulation test signal: a low tone f1 and a high tone f2 with amplitudes
 * in the ratio `ratio`:1 (default 4:1, SMPTE RP120 and IEC 60268-3), whose combined peak
 * A1 + A2 is the peak of a sine at `levelDbfs`. DIN 45403 uses 250 Hz + 8 kHz.
 */
export const ImdSmpteSpec = z
  .strictObject({
    kind: z.literal('imd-smpte'),
    ...base,
    seconds: Seconds,
    levelDbfs: LevelDbfs.default(-20),
    lowFrequency: Frequency.default(60),
    highFrequency: Frequency.default(7000),
    /** Amplitude ratio low:high (4 means 4:1). */
    ratio: z
      .number()
      .min(1 / MAX_IMD_RATIO, `must be at least 1/${MAX_IMD_RATIO}`)
      .max(MAX_IMD_RATIO, `must be at most ${MAX_IMD_RATIO}`)
      .default(4),
    ...fades,
  })
  .refine((s) => s.lowFrequency < s.highFrequency, { message: 'lowFrequency must be below highFrequency', path: ['lowFrequency'] })
  .refine((s) => s.highFrequency < s.sampleRate / 2, { message: nyquistMessage('highFrequency'), path: ['highFrequency'] })
  .refine((s) => s.fadeInSeconds + s.fadeOutSeconds <= s.seconds, {
    message: 'fades together must not be longer than the signal',
    path: ['fadeInSeconds'],
  })
  .superRefine(checkSampleBudget);
export type ImdSmpteSpec = z.infer<typeof ImdSmpteSpec>;

/**
 * Twin-tone (difference-frequency) intermodulation test signal: two equal tones at
 * `lowFrequency` and `highFrequency` (default 18 kHz and 19 kHz, 1 kHz apart), whose combined
 * peak 2A is the peak of a sine at `levelDbfs` (IEC 60268-3, IEC 60118 difference-frequency
 * distortion).
 */
export const ImdTwinToneSpec = z
  .strictObject({
    kind: z.literal('imd-twin-tone'),
    ...base,
    seconds: Seconds,
    levelDbfs: LevelDbfs.default(-20),
    lowFrequency: Frequency.default(18000),
    highFrequency: Frequency.default(19000),
    ...fades,
  })
  .refine((s) => s.lowFrequency < s.highFrequency, { message: 'lowFrequency must be below highFrequency', path: ['lowFrequency'] })
  .refine((s) => s.highFrequency < s.sampleRate / 2, { message: nyquistMessage('highFrequency'), path: ['highFrequency'] })
  .refine((s) => s.fadeInSeconds + s.fadeOutSeconds <= s.seconds, {
    message: 'fades together must not be longer than the signal',
    path: ['fadeInSeconds'],
  })
  .superRefine(checkSampleBudget);
export type ImdTwinToneSpec = z.infer<typeof ImdTwinToneSpec>;

/** Any stimulus, told apart by `kind`. */
export const StimulusSpec = z.discriminatedUnion('kind', [
  SineSpec,
  MultitoneSpec,
  SweepSpec,
  ImpulseSpec,
  WhiteNoiseSpec,
  PinkNoiseSpec,
  SilenceSpec,
  ImdSmpteSpec,
  ImdTwinToneSpec,
]);
export type StimulusSpec = z.infer<typeof StimulusSpec>;
/** The JSON a user writes (defaults not yet filled in). */
export type StimulusSpecInput = z.input<typeof StimulusSpec>;
export type StimulusKind = StimulusSpec['kind'];
export const STIMULUS_KINDS = ['sine', 'multitone', 'sweep', 'impulse', 'white-noise', 'pink-noise', 'silence', 'imd-smpte', 'imd-twin-tone'] as const;
