import { JudgingSettings, MaskDocument, StimulusSpec, defaultPlotSelection } from '@earmark/contracts';
import { encodeWav } from '@earmark/dsp';
import { describe, expect, it } from 'vitest';
import { judge } from '../src/compute/analysis.thread.js';
import type { JudgeOutcome } from '../src/compute/analysis-tasks.js';
import { plotCheckResult } from '../src/plots/plot-view.js';

/**
 * The analysis thread stores the plot the capture page opens on: the worst failing spectral
 * check on its worst channel (contracts `defaultPlotSelection`), not the mask's first envelope.
 */
const FS = 48000;
const spec = StimulusSpec.parse({ kind: 'sine', sampleRate: FS, seconds: 0.2, frequency: 997, levelDbfs: -12 });
const tone = (amplitude: number) => Float64Array.from({ length: 9600 }, (_, i) => amplitude * Math.sin((2 * Math.PI * 997 * i) / FS));
// Channel 1 is 6 dB louder: it alone breaks the tight envelope; the wide one (the mask's first) passes.
const mask = MaskDocument.parse({
  checks: [
    { id: 'peak', kind: 'level', metric: 'peak-dbfs', max: 0 },
    { id: 'env-wide', kind: 'magnitude-envelope', measure: 'level', upper: [{ hz: 100, db: 0 }, { hz: 10000, db: 0 }] },
    { id: 'env-tight', kind: 'magnitude-envelope', measure: 'level', upper: [{ hz: 200, db: -10.5 }, { hz: 5000, db: -10.5 }] },
  ],
});

describe('the default plot the analysis thread draws', () => {
  it('opens on the worst failing spectral check and the channel that set it, as the capture page does', async () => {
    const bytes = encodeWav([tone(0.25), tone(0.5)], FS, { encoding: 'float', bitsPerSample: 32 });
    const settings = JudgingSettings.parse({ stimulus: spec, analysis: {}, channelMap: [0, 1] });
    const answer = (await judge({ bytes, request: { format: { container: 'wav', sampleRate: FS, channels: 2 }, settings, mask }, memoryBudgetMb: 512, plotFor: { captureId: 'c1', maskRevisionId: 'm1' } })) as { ok: true; value: JudgeOutcome };
    const { judgement, plot } = answer.value;
    expect(judgement.outcome).toBe('fail');
    const tight = judgement.checks.find((c) => c.id === 'env-tight')!;
    expect(tight).toMatchObject({ pass: false, details: expect.objectContaining({ channel: 1 }) });

    expect(plot!.identity).toMatchObject({ captureId: 'c1', maskRevisionId: 'm1', checkId: 'env-tight', channel: 1, columns: 1024 });
    const page = defaultPlotSelection({ checks: mask.checks, results: judgement.checks.map((c) => plotCheckResult(c.id, c.pass, c.margin, c.details)), channelMap: [0, 1], channelCount: 2 });
    expect(page).toEqual({ checkId: 'env-tight', channel: 1 });
    const stored = plot!.stored;
    expect('plot' in stored && stored.plot.checkId).toBe('env-tight');
    expect('plot' in stored && stored.plot.failingRegions.length).toBeGreaterThan(0);
  });
});
