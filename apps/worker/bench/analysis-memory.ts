// Peak memory of judging one capture at the decoded-sample limit (MAX_DECODED_SAMPLES), in a
// fresh process: what EARMARK_ANALYSIS_MEMORY_MB must hold. Run one shape per process:
//   node --import tsx bench/analysis-memory.ts mono48k|octo192k
// Prints the process's peak RSS (VmHWM) and its RSS before the analysis as JSON; with --trace-gc the
// largest heap a collection saw is the V8-heap share (typed arrays live outside the heap).
import fs from 'node:fs';
import { JudgingSettings, MaskDocument, StimulusSpec, type MaskCheckInput } from '@earmark/contracts';
import { MAX_DECODED_SAMPLES, decodeCapture, encodeWav, stimulusAsPlayed } from '@earmark/dsp';
import { judgeAudio } from '@earmark/domain';

const SHAPES = {
  /** 2^25 samples of mono at 48 kHz (699 s) against a 300 s sweep: the longest whole-record transforms. */
  mono48k: { sampleRate: 48000, channels: 1, sweepSeconds: 299.5 },
  /** 2^25 samples as 8 channels at 192 kHz (21.8 s) against a 10.4 s sweep: the widest capture. */
  octo192k: { sampleRate: 192000, channels: 8, sweepSeconds: 10.4 },
} as const;

const kib = (line: string) => Number(/(\d+) kB/.exec(fs.readFileSync('/proc/self/status', 'utf8').split('\n').find((l) => l.startsWith(line)) ?? '')?.[1] ?? 0) / 1024;
const shape = SHAPES[(process.argv[2] ?? 'mono48k') as keyof typeof SHAPES];
const frames = Math.floor(MAX_DECODED_SAMPLES / shape.channels);
const spec = StimulusSpec.parse({ kind: 'sweep', sampleRate: shape.sampleRate, seconds: shape.sweepSeconds, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.5, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
const checks: MaskCheckInput[] = [
  { id: 'response', kind: 'magnitude-envelope', measure: 'transfer', referenceHz: 1000, upper: [{ hz: 100, db: 1 }, { hz: 16000, db: 1 }], lower: [{ hz: 100, db: -1 }, { hz: 16000, db: -1 }] },
  { id: 'thd', kind: 'distortion-vs-frequency', metric: 'thd-db', max: [{ hz: 100, db: -40 }, { hz: 10000, db: -40 }] },
  { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -40, max: 0 },
  { id: 'clipping', kind: 'integrity', metric: 'clipped-samples', max: 0 },
  { id: 'clicks', kind: 'integrity', metric: 'discontinuities', max: 0 },
  { id: 'parseval', kind: 'level', metric: 'energy-parseval', max: 1e-6 },
];

// The capture: the played sweep, 37 samples late, on every channel, with silence to the limit; stored as 24-bit WAV.
let bytes: Uint8Array;
{
  const played = stimulusAsPlayed(spec).channels[0]!;
  const channel = new Float64Array(frames);
  channel.set(played.subarray(0, Math.min(played.length, frames - 37)), 37);
  bytes = encodeWav(Array.from({ length: shape.channels }, () => channel), shape.sampleRate, { bitsPerSample: 24 });
}
const before = kib('VmRSS');
const started = performance.now();
const request = { format: { container: 'wav' as const, sampleRate: shape.sampleRate, channels: shape.channels }, settings: JudgingSettings.parse({ stimulus: spec, analysis: {}, channelMap: [] }), mask: MaskDocument.parse({ checks }) };
const judgement = judgeAudio(decodeCapture(bytes, request.format), stimulusAsPlayed(spec), request);
const seconds = (performance.now() - started) / 1000;
console.log(JSON.stringify({
  shape: process.argv[2] ?? 'mono48k', samples: frames * shape.channels, storedMiB: Math.round(bytes.byteLength / 2 ** 20),
  outcome: judgement.outcome, reason: judgement.reason, seconds: Number(seconds.toFixed(1)),
  rssBeforeMiB: Math.round(before), peakRssMiB: Math.round(kib('VmHWM'))
}));
