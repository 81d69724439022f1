import { ComputeTaskError, ComputeThreadError } from '@earmark/platform';
import { UnsupportedCaptureError } from '../errors.js';

/** The decoder's refusal (AudioDecodeError in a thread) as the domain's 422 with its code, else null. */
export function decodeRefusalOf(error: unknown, describe: (message: string) => string = (m) => m): UnsupportedCaptureError | null {
  if (error instanceof ComputeTaskError && error.taskErrorName === 'AudioDecodeError') {
    return new UnsupportedCaptureError(describe(error.message), typeof error.props.code === 'string' ? error.props.code : 'undecodable');
  }
  return null;
}

/**
 * Why a capture cannot be plotted, when that is a property of the capture (it would fail the same
 * way next time, so the answer is stored): the decoder refuses it, the engine cannot draw it, or
 * drawing it outgrows a thread's memory. Null for passing trouble (busy pool, store down).
 */
export function plotRefusalOf(error: unknown, captureId: string): { code: string; detail: string } | null {
  const refused = decodeRefusalOf(error, (m) => `Capture ${captureId} cannot be analysed: ${m}`);
  if (refused) return { code: refused.code ?? 'undecodable', detail: refused.message };
  if (error instanceof ComputeTaskError) return { code: 'cannot-plot', detail: `Capture ${captureId} cannot be plotted: ${error.message}` };
  if (error instanceof ComputeThreadError) {
    return { code: 'plot-too-large', detail: `Capture ${captureId} is too large to plot within the memory set aside for one plot.` };
  }
  return null;
}
