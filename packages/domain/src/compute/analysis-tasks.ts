import type { JudgeRequest } from '../judging/judge-capture.js';
import type { Judgement } from '../judging/judgement.js';
import type { PlotIdentity, StoredPlot } from '../plots/plot-store.js';

/** What the `judge` task answers: the judgement, whether the stimulus came from the thread's cache, and when the thread worked on it. */
export interface JudgeOutcome {
  judgement: Judgement;
  /** `null` when the analysis failed before the stimulus was needed. */
  stimulus: 'built' | 'cached' | null;
  /** Wall-clock ms (Date.now()) in the thread: queue wait and overlap show in the logs. */
  startedAt: number;
  endedAt: number;
  /** The capture page's default plot, drawn from the audio the thread already decoded; the worker stores it once the verdict is recorded. */
  plot: { identity: PlotIdentity; stored: StoredPlot } | null;
  /** Milliseconds of each phase in the thread (performance.now()), for the worker's per-job log. */
  phases: AnalysisPhases;
}

/** Where the thread's time goes; a phase not reached stays 0. */
export interface AnalysisPhases {
  decodeMs: number;
  stimulusMs: number;
  judgeMs: number;
  plotMs: number;
}

/** The tasks of `analysis.thread.ts`: their inputs and answers, shared by the worker and the thread. */
export interface AnalysisTasks {
  /** Decode, stimulus (cached per thread), mask evaluation. `bytes` should be transferred. */
  judge: { input: { bytes: Uint8Array; request: JudgeRequest; memoryBudgetMb: number; plotFor?: { captureId: string; maskRevisionId: string | null } }; output: JudgeOutcome };
  /** Loads the thread's modules, so the first capture does not pay for it. Answers the thread id. */
  warm: { input: Record<string, never>; output: number };
}

/** Where the pool loads the tasks from (TypeScript in development: the threads load it through tsx). */
export const ANALYSIS_THREAD_MODULE = new URL(`./analysis.thread.${import.meta.url.endsWith('.ts') ? 'ts' : 'js'}`, import.meta.url);
