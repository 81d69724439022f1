import { MaskDocument, StimulusSpec, type MaskCheckInput } from '@earmark/contracts';
import { generateStimulus, type GeneratedStimulus } from '../../src/index.js';

/** Sample rate of every mask test signal. */
export const FS = 48000;

/** 1 s exponential sweep 20 Hz…20 kHz at −6 dBFS (Farina), analysed by deconvolution. */
export const SWEEP: GeneratedStimulus = generateStimulus(StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, from: 20, to: 20000, seconds: 1, levelDbfs: -6 }));

/** 1 s Schroeder-phase multitone, 61 log-spaced tones 20 Hz…20 kHz at −12 dBFS, analysed by H1. */
export const MULTITONE: GeneratedStimulus = generateStimulus(StimulusSpec.parse({ kind: 'multitone', sampleRate: FS, from: 20, to: 20000, count: 61, seconds: 1, levelDbfs: -12 }));

/** Parses checks through the contracts schema, as the API and CLI do before evaluating. */
export function mask(...checks: MaskCheckInput[]): MaskDocument {
  return MaskDocument.parse({ checks });
}

/** A flat ±db envelope from lo to hi Hz on the transfer function. */
export function flatEnvelope(id: string, db: number, lo = 50, hi = 16000): MaskCheckInput {
  return {
    id,
    kind: 'magnitude-envelope',
    measure: 'transfer',
    upper: [{ hz: lo, db }, { hz: hi, db }],
    lower: [{ hz: lo, db: -db }, { hz: hi, db: -db }],
  };
}

/** RMS of x in dBFS by the AES17 definition, 20·log10(rms·√2), computed here independently of the engine. */
export function rmsDbfs(x: Float64Array): number {
  let s = 0;
  for (const v of x) s += v * v;
  return 20 * Math.log10(Math.sqrt(s / x.length) * Math.SQRT2);
}
