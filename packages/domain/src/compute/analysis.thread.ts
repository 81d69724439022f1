/**
 * The worker's analysis thread: judges one capture per task from plain data (the stored bytes,
 * transferred, and the mask revision's settings and checks), so N threads keep N cores busy
 * while the worker's event loop only polls jobs and writes verdicts. Loaded by
 * `createComputePool` (packages/platform).
 */
import { threadId } from 'node:worker_threads';
import { JudgingSettings, MaskDocument } from '@earmark/contracts';
import { decodeCapture } from '@earmark/dsp';
import { defineComputeTasks } from '@earmark/platform';
import { analysisFailed, judgeAudio, judgingContext, type JudgeRequest } from '../judging/judge-capture.js';
import { analysisMemoryRefusal } from '../judging/analysis-memory.js';
import { StimulusCache } from '../judging/stimulus-cache.js';
import { renderDefaultPlot } from '../plots/plot-store.js';
import type { AnalysisPhases, AnalysisTasks, JudgeOutcome } from './analysis-tasks.js';
import { DEFAULT_MAX_PLOT_SAMPLES } from './views-tasks.js';

/** Above this many decoded samples the default plot does not share the verdict's capture context. */
const SHARED_CONTEXT_MAX_SAMPLES = DEFAULT_MAX_PLOT_SAMPLES;

/** One per thread: captures of a test case share their stimulus. */
const stimuli = new StimulusCache();

const tasks = {
  judge(input: AnalysisTasks['judge']['input']): JudgeOutcome {
    const startedAt = Date.now();
    let stimulus: JudgeOutcome['stimulus'] = null;
    let plot: JudgeOutcome['plot'] = null;
    const phases: AnalysisPhases = { decodeMs: 0, stimulusMs: 0, judgeMs: 0, plotMs: 0 };
    let mark = performance.now();
    const lap = (phase: keyof AnalysisPhases) => {
      const now = performance.now();
      phases[phase] = now - mark;
      mark = now;
    };
    const done = (judgement: JudgeOutcome['judgement']): JudgeOutcome => ({ judgement, stimulus, startedAt, endedAt: Date.now(), plot, phases });
    try {
      const request: JudgeRequest = { format: input.request.format, settings: JudgingSettings.parse(input.request.settings), mask: MaskDocument.parse(input.request.mask) };
      const audio = decodeCapture(input.bytes, request.format);
      lap('decodeMs');
      const refusal = analysisMemoryRefusal(audio.frames * audio.channels.length, input.memoryBudgetMb);
      if (refusal) return done(refusal);
      const played = stimuli.get(request.settings.stimulus);
      stimulus = played.cached ? 'cached' : 'built';
      lap('stimulusMs');
      let context: ReturnType<typeof judgingContext> | undefined = judgingContext(audio, played.stimulus, request);
      const judgement = judgeAudio(audio, played.stimulus, request, context);
      lap('judgeMs');
      // The memory per analysis (ANALYSIS_BYTES_PER_SAMPLE) was measured for judging alone: past the
      // API's plot budget the verdict's measures are let go before the plot makes its own.
      if (audio.frames * audio.channels.length > SHARED_CONTEXT_MAX_SAMPLES) context = undefined;
      // The capture page's first view reads this plot instead of decoding and transforming again on the API;
      // drawn from the verdict's context, it measures nothing twice.
      if (input.plotFor) plot = renderDefaultPlot({ ...input.plotFor, settings: request.settings, checks: request.mask.checks, audio, played: played.stimulus, ...(context ? { context } : {}), verdictChecks: judgement.checks });
      lap('plotMs');
      return done(judgement);
    } catch (error) {
      return done(analysisFailed(error));
    }
  },
  warm: (): number => threadId,
};

export const { judge, warm } = defineComputeTasks(tasks);
