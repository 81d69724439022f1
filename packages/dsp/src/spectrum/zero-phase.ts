import { precondition } from '../util/preconditions.js';

/**
 * Index of a frame's time origin for zero-phase placement: c = (M−1)/2 for odd M (the
 * centre sample of a symmetric frame), c = M/2 for even M (the symmetry centre of a
 * periodic, DFT-even frame).
 */
export function zeroPhaseCentre(frameLength: number): number {
  return Math.floor(frameLength / 2);
}

/**
 * Places a frame into an N-point FFT buffer with its centre sample c at index 0: samples
 * c…M−1 go to indices 0…M−1−c, samples 0…c−1 to the end of the buffer (N−c…N−1), zeros
 * between. A frame symmetric about c then has a purely real spectrum, so the phase measures
 * the signal, not the frame's position.
 * @param frame M samples
 * @param output N ≥ M samples, caller-owned; fully overwritten
 * @throws RangeError when the buffer is shorter than the frame
 * @see J. O. Smith III, "Spectral Audio Signal Processing", W3K 2011, "Zero-phase zero padding"
 */
export function placeZeroPhase(frame: Float64Array, output: Float64Array): Float64Array {
  const m = frame.length;
  const n = output.length;
  precondition(m >= 1 && n >= m, 'placeZeroPhase', `output (${n}) must hold at least the frame (${m} samples)`);
  const c = zeroPhaseCentre(m);
  output.fill(0);
  output.set(frame.subarray(c), 0);
  output.set(frame.subarray(0, c), n - c);
  return output;
}

/**
 * Undoes `placeZeroPhase`: reads the M-sample frame back out of an N-point buffer.
 * @throws RangeError when the buffer is shorter than the frame
 */
export function extractZeroPhase(buffer: Float64Array, frameLength: number, output: Float64Array = new Float64Array(frameLength)): Float64Array {
  const n = buffer.length;
  precondition(Number.isInteger(frameLength) && frameLength >= 1 && frameLength <= n, 'extractZeroPhase', `frameLength must be 1…${n} (got ${frameLength})`);
  precondition(output.length === frameLength, 'extractZeroPhase', `output must hold ${frameLength} samples`);
  const c = zeroPhaseCentre(frameLength);
  output.set(buffer.subarray(0, frameLength - c), c);
  output.set(buffer.subarray(n - c, n), 0);
  return output;
}
