import { precondition } from '../util/preconditions.js';

const TWO_PI = 2 * Math.PI;

/**
 * Unwraps a phase sequence (radians) with numpy.unwrap semantics: wherever consecutive values
 * jump by at least `discont` (default π), add the multiple of 2π that brings the jump into
 * [−π, π) (a jump of exactly +π stays +π).
 * @param phase wrapped phase, radians
 * @param output caller-owned buffer of the same length (may be `phase`)
 * @param discont jump threshold ≥ 0; values below π act as π, as in numpy
 * @throws RangeError on length mismatch or a negative/non-finite threshold
 * @see numpy.unwrap documentation and source (numpy/lib/_function_base_impl.py)
 */
export function unwrapPhase(phase: Float64Array, output: Float64Array = new Float64Array(phase.length), discont = Math.PI): Float64Array {
  precondition(output.length === phase.length, 'unwrapPhase', 'output length must equal phase length');
  precondition(Number.isFinite(discont) && discont >= 0, 'unwrapPhase', `discont must be a finite number ≥ 0 (got ${discont})`);
  const threshold = Math.max(discont, Math.PI);
  if (phase.length === 0) return output;
  let previous = phase[0] as number;
  let correction = 0;
  output[0] = previous;
  for (let i = 1; i < phase.length; i++) {
    const current = phase[i] as number;
    const dd = current - previous;
    previous = current;
    if (Math.abs(dd) >= threshold) {
      // Python-style modulo (sign of the divisor), as numpy.mod.
      let ddmod = dd + Math.PI - TWO_PI * Math.floor((dd + Math.PI) / TWO_PI) - Math.PI;
      if (ddmod === -Math.PI && dd > 0) ddmod = Math.PI;
      correction += ddmod - dd;
    }
    output[i] = current + correction;
  }
  return output;
}
