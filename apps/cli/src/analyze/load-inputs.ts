import { readFile } from 'node:fs/promises';
import { StimulusSpec } from '@earmark/contracts';
import { decodeWav, generateStimulus, type DecodedAudio } from '@earmark/dsp';

/** Reads and decodes a WAV file; every failure becomes one line naming the file. */
export async function loadWav(path: string, role: string): Promise<DecodedAudio> {
  let bytes: Uint8Array;
  try {
    bytes = new Uint8Array(await readFile(path));
  } catch (e) {
    throw new Error(`cannot read ${role} ${path}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
  }
  try {
    return decodeWav(bytes);
  } catch (e) {
    throw new Error(`${role} ${path} is not a readable WAV file: ${(e as Error).message}`);
  }
}

/** A reference signal built from a stimulus spec file, with the spec's kind. */
export interface SpecReference {
  kind: StimulusSpec['kind'];
  sampleRate: number;
  channels: Float64Array[];
}

/** Reads a stimulus spec (JSON, contracts' StimulusSpec) and generates its signal. */
export async function loadStimulusSpec(path: string): Promise<SpecReference> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (e) {
    throw new Error(`cannot read stimulus spec ${path}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    throw new Error(`stimulus spec ${path} is not valid JSON: ${(e as Error).message}`);
  }
  const parsed = StimulusSpec.safeParse(json);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const where = issue && issue.path.length > 0 ? `${issue.path.join('.')}: ` : '';
    throw new Error(`stimulus spec ${path} is invalid: ${where}${issue?.message ?? 'unknown problem'}`);
  }
  const generated = generateStimulus(parsed.data);
  return { kind: parsed.data.kind, sampleRate: generated.sampleRate, channels: generated.channels };
}

/** The flags `analyze` and `evaluate` share: where the stimulus comes from, which channel, which estimator. */
export interface InputFlags {
  reference?: string;
  stimulus?: string;
  channel?: string;
  transferMethod?: 'h1' | 'deconvolution';
}

export interface AnalysisInputs {
  capture: DecodedAudio;
  reference?: { sampleRate: number; channels: readonly Float64Array[] };
  transferMethod?: 'h1' | 'deconvolution';
  channels?: number[];
}

/**
 * Loads the capture and its stimulus (a WAV, or a spec generated here) and checks the flags
 * against each other, the way both engine commands need them.
 * @throws Error with a one-line message for conflicting or out-of-range flags
 */
export async function loadAnalysisInputs(capturePath: string, flags: InputFlags): Promise<AnalysisInputs> {
  if (flags.reference !== undefined && flags.stimulus !== undefined) throw new Error('give either --reference or --stimulus, not both');
  const capture = await loadWav(capturePath, 'capture');
  let reference: AnalysisInputs['reference'];
  let method = flags.transferMethod;
  if (flags.reference !== undefined) reference = await loadWav(flags.reference, 'reference');
  if (flags.stimulus !== undefined) {
    const spec = await loadStimulusSpec(flags.stimulus);
    reference = spec;
    // A sweep is deterministic and covers its band once: deconvolve it rather than average.
    method ??= spec.kind === 'sweep' ? 'deconvolution' : 'h1';
  }
  if (reference && reference.sampleRate !== capture.sampleRate) {
    throw new Error(`the reference runs at ${reference.sampleRate} Hz but the capture at ${capture.sampleRate} Hz; resample one of them`);
  }
  let channels: number[] | undefined;
  if (flags.channel !== undefined) {
    const c = Number(flags.channel);
    if (!Number.isInteger(c) || c < 0 || c >= capture.channels.length) {
      throw new Error(`--channel must be a channel index 0…${capture.channels.length - 1} (channels count from 0); got "${flags.channel}"`);
    }
    channels = [c];
  }
  return { capture, ...(reference ? { reference } : {}), ...(method ? { transferMethod: method } : {}), ...(channels ? { channels } : {}) };
}
