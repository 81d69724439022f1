import { JudgingSettings, MaskDocument, StimulusSpec, type MaskCheckInput } from '@earmark/contracts';
import { CaptureContext, decodeCapture, encodeWav, stimulusAsPlayed } from '@earmark/dsp';
import { addNoise, applyBiquad, delay, peakingEqCoefficients } from '@earmark/dsp/testing';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { judgeAudio, judgingContext, type JudgeRequest } from '../src/judging/judge-capture.js';
import { renderDefaultPlot } from '../src/plots/plot-store.js';

/**
 * The analysis thread draws the default plot from the verdict's capture context. The stored plot
 * must be exactly the one a fresh context draws (what the API draws on a cache miss), and the
 * context must really be reused where the plot and the verdict measure the same signals.
 */
const FS = 48000;
const sweep = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 0.5, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.1, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
const sine = StimulusSpec.parse({ kind: 'sine', sampleRate: FS, seconds: 0.5, levelDbfs: -20, frequency: 997 });
const multitone = StimulusSpec.parse({ kind: 'multitone', sampleRate: FS, seconds: 0.5, levelDbfs: -18, from: 40, to: 16000, count: 31, seed: 7 });
const silence = StimulusSpec.parse({ kind: 'silence', sampleRate: FS, seconds: 0.5 });

const envelope = (db: number): MaskCheckInput => ({ id: 'response', kind: 'magnitude-envelope', measure: 'transfer', referenceHz: 1000, smoothing: 6, upper: [{ hz: 50, db }, { hz: 16000, db }], lower: [{ hz: 50, db: -db }, { hz: 16000, db: -db }] });

interface Case {
  name: string;
  spec: StimulusSpec;
  checks: MaskCheckInput[];
  analysis?: JudgingSettings['analysis'];
  channelMap?: number[];
  /** The recorded channels, from the played stimulus. */
  record(played: Float64Array): Float64Array[];
  /** The plot measures the same signals as the verdict (false: a silence, drawn without a stimulus). */
  shares: boolean;
}

// A unit with a 2 dB bump at 3 kHz (the ±1 dB envelope fails there), half a millisecond late, with a 24-bit noise floor.
const unit = (x: Float64Array, seed: number) => addNoise(applyBiquad(delay(x, 24), peakingEqCoefficients(FS, 3000, 2, 2)), -110, seed);

const CASES: Case[] = [
  { name: 'sweep: envelope (failing), level, clipping, latency', spec: sweep, checks: [envelope(1), { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -22, max: -10 }, { id: 'no-clipping', kind: 'integrity', metric: 'clipped-samples', max: 0 }, { id: 'latency', kind: 'timing', metric: 'latency-ms', max: 10 }], record: (x) => [unit(x, 1)], shares: true },
  { name: 'sweep: one level check (the plot alone needs the transfer)', spec: sweep, checks: [{ id: 'level', kind: 'level', metric: 'rms-dbfs', min: -22, max: -10 }], record: (x) => [unit(x, 2)], shares: true },
  {
    name: 'sweep, two channels, the second mapped: band levels, phase linearity over a set band',
    spec: sweep,
    analysis: { transferBandHz: [100, 8000] },
    channelMap: [1],
    checks: [
      { id: 'bands', kind: 'band-levels', fraction: 3, measure: 'transfer', referenceHz: 1000, bands: [{ centerHz: 250, min: -1, max: 1 }, { centerHz: 3150, min: -1, max: 1 }] },
      { id: 'phase', kind: 'phase-linearity', maxDeviationDeg: 20 },
    ],
    record: (x) => [delay(x, 24), unit(x, 3)],
    shares: true,
  },
  { name: 'sine: level, THD, THD+N', spec: sine, checks: [{ id: 'level', kind: 'level', metric: 'rms-dbfs', min: -20.5, max: -19.5 }, { id: 'thd', kind: 'distortion', metric: 'thd-percent', max: 0.05 }, { id: 'thdn', kind: 'distortion', metric: 'thdn-db', max: -70 }], record: (x) => [addNoise(x, -110, 4)], shares: true },
  { name: 'multitone: envelope and clipping', spec: multitone, checks: [envelope(2), { id: 'no-clipping', kind: 'integrity', metric: 'clipped-samples', max: 0 }], record: (x) => [unit(x, 5)], shares: true },
  { name: 'sweep cut short: no transfer estimate, the level spectrum is drawn', spec: sweep, checks: [envelope(1)], record: (x) => [delay(x, 24).slice(0, Math.round(0.3 * FS))], shares: true },
  { name: 'silence: idle level and DC', spec: silence, checks: [{ id: 'idle', kind: 'level', metric: 'rms-dbfs', max: -96 }, { id: 'dc', kind: 'integrity', metric: 'dc-offset', max: 0.0001 }], record: (x) => [addNoise(x, -110, 6)], shares: false },
];

afterEach(() => {
  vi.restoreAllMocks();
});

describe('the default plot drawn from the verdict’s capture context', () => {
  for (const c of CASES) {
    it(`is the plot a fresh context draws — ${c.name}`, () => {
      const played = stimulusAsPlayed(c.spec);
      const recorded = c.record(played.channels[0]!);
      const format = { container: 'wav', sampleRate: FS, channels: recorded.length } as const;
      const audio = decodeCapture(encodeWav(recorded, FS, { bitsPerSample: 24 }), format);
      const settings = JudgingSettings.parse({ stimulus: c.spec, analysis: c.analysis ?? {}, channelMap: c.channelMap ?? [] });
      const request: JudgeRequest = { format, settings, mask: MaskDocument.parse({ checks: c.checks }) };
      const plotInput = { captureId: 'c1', maskRevisionId: 'm1', settings, checks: request.mask.checks, audio, played };

      const context = judgingContext(audio, played, request);
      const judgement = judgeAudio(audio, played, request, context);
      // Which contexts the plot reads its channel from: the verdict's when shared, another one otherwise.
      const readFrom = new Set<CaptureContext>();
      const signal = CaptureContext.prototype.signal;
      vi.spyOn(CaptureContext.prototype, 'signal').mockImplementation(function (this: CaptureContext, channel: number) {
        readFrom.add(this);
        return signal.call(this, channel);
      });
      const shared = renderDefaultPlot({ ...plotInput, context });
      vi.restoreAllMocks();
      const fresh = renderDefaultPlot(plotInput);

      expect(shared).toEqual(fresh);
      expect('plot' in shared.stored).toBe(true);
      expect(readFrom.has(context)).toBe(c.shares);
      if (c.shares) expect(readFrom.size).toBe(1);
      // The verdict is the one judging without a shared context gives.
      expect(judgeAudio(audio, played, request)).toEqual(judgement);
    });
  }

  it('is not reused for another capture', () => {
    const played = stimulusAsPlayed(sweep);
    const settings = JudgingSettings.parse({ stimulus: sweep, analysis: {}, channelMap: [] });
    const format = { container: 'wav', sampleRate: FS, channels: 1 } as const;
    const request: JudgeRequest = { format, settings, mask: MaskDocument.parse({ checks: [envelope(1)] }) };
    const decode = (seed: number) => decodeCapture(encodeWav([unit(played.channels[0]!, seed)], FS, { bitsPerSample: 24 }), format);
    const judged = decode(7);
    const drawn = decode(8);
    const context = judgingContext(judged, played, request);
    judgeAudio(judged, played, request, context);
    const plotInput = { captureId: 'c2', maskRevisionId: 'm1', settings, checks: request.mask.checks, audio: drawn, played };
    expect(renderDefaultPlot({ ...plotInput, context })).toEqual(renderDefaultPlot(plotInput));
  });
});
