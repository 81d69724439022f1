import type { Capture, MaskRevision } from '@earmark/db';
import { analysisFailed, analysisOutOfMemory, isJudgement, judgeRequestFor, ownBuffer, type JudgeOutcome, type Judgement } from '@earmark/domain';
import { ComputeTaskError, ComputeThreadError, type ComputePool } from '@earmark/platform';

/** The worker's analysis threads: one pool task per slot, each slot within its memory budget. */
export interface AnalysisSlots {
  pool: Pick<ComputePool, 'run'>;
  memoryMb: number;
}

/**
 * Judges a capture in an analysis thread; the rows are read here, the thread gets plain data
 * and the bytes (moved, not copied, when the buffer is the capture's own).
 * A thread that outgrew its memory budget is an `error` judgement: the capture would do the
 * same on every attempt.
 * @throws ComputePoolBusyError when every slot is taken; ComputeThreadError when a thread died
 *   otherwise (crash, shutdown) — both worth another attempt, so the job retries
 */
export async function judgeInThread(bytes: Buffer, capture: Capture, mask: MaskRevision | null, slots: AnalysisSlots): Promise<{ judgement: Judgement; run: JudgeOutcome | null }> {
  const request = judgeRequestFor(capture, mask);
  if (isJudgement(request)) return { judgement: request, run: null };
  const view = new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  try {
    const plotFor = { captureId: capture.id, maskRevisionId: mask?.id ?? null };
    const run = await slots.pool.run<JudgeOutcome>('judge', { bytes: view, request, memoryBudgetMb: slots.memoryMb, plotFor }, ownBuffer(view));
    return { judgement: run.judgement, run };
  } catch (error) {
    if (error instanceof ComputeThreadError && error.outOfMemory) return { judgement: analysisOutOfMemory(slots.memoryMb), run: null };
    // The task catches the analysis's own errors; one that still escapes is as final as they are.
    if (error instanceof ComputeTaskError) return { judgement: analysisFailed(error), run: null };
    throw error;
  }
}
