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
