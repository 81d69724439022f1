import { ENGINE_VERSION } from '@earmark/dsp';
import { errorJudgement, type Judgement } from './judgement.js';

/**
 * Peak bytes one analysis holds per decoded sample, measured at the decoded-sample limit
 * (`apps/worker/bench/analysis-memory.ts`, docs/capture-formats.md): 2^25 samples of mono at
 * 48 kHz, the worst shape, peaked 2.6 GiB above the inputs (8 channels at 192 kHz: 0.8 GiB).
 * Most of it is typed arrays, which live outside V8's heap: a thread's heap limit alone would
 * not stop them, so a capture is measured against the budget before its analysis starts.
 */
export const ANALYSIS_BYTES_PER_SAMPLE = 84;

/** The `error` judgement of an analysis that outgrew the memory budget of its slot. */
export const analysisOutOfMemory = (budgetMb: number): Judgement =>
  errorJudgement(`Analysis stopped: the analysis needed more than ${budgetMb} MB (EARMARK_ANALYSIS_MEMORY_MB, the memory budget of one analysis slot).`, ENGINE_VERSION);

/**
 * Refuses, before any transform, a capture whose analysis would need more than the slot's
 * budget by the measured figure; `null` when it fits.
 */
export function analysisMemoryRefusal(samples: number, budgetMb: number): Judgement | null {
  return samples * ANALYSIS_BYTES_PER_SAMPLE > budgetMb * 2 ** 20 ? analysisOutOfMemory(budgetMb) : null;
}
