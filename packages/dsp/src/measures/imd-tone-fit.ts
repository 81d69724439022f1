import { solveLinearSystem } from '../util/linear-solve.js';
import { cosineSum, project, subtractSinusoid } from './sine-fit.js';
import { precondition, requirePositive } from '../util/preconditions.js';

// NOTE: as in sine-fit.ts, the time index is centred, t = n − (N−1)/2: over a grid symmetric
// about 0, Σ cos(a·t)·sin(b·t) = 0 and Σ sin(a·t) = 0, so the cosine block (with DC) and the
// sine block of the normal equations decouple and can be formed in closed form.


/** One fitted sinusoid, x_i(t) = a·cos(ω_i·t) + b·sin(ω_i·t), t = n − (N−1)/2. */
export interface SinusoidComponent {
  frequencyHz: number;
  /** Peak amplitude √(a² + b²). */
  amplitude: number;
  a: number;
  b: number;
  /** Model column (distinct frequency) it was fitted with; frequencies merged into one share it. */
  column: number;
}

/** Joint least-squares fit of DC and sinusoids at known frequencies. */
export interface SinusoidFit {
  dc: number;
  /** One per requested frequency, in the order given; frequencies merged into one column share its values. */
  components: SinusoidComponent[];
}


/**
 * Joint linear least-squares fit of DC and sinusoids at the given frequencies (the
 * multi-tone form of the three-parameter fit). Frequencies closer together than one DFT bin
 * of the record (fs/N) cannot be told apart and are merged into one column, which then
 * reports their sum (e.g. a DIN sideband f2 − n·f1 that falls on a harmonic of f1).
 * Cost O(N·K) for K distinct frequencies; the normal matrix is formed in closed form.
 * @param frequenciesHz frequencies in (0, fs/2 − fs/N)
 * @throws RangeError on a short record, a bad rate, no frequencies, a frequency outside the
 *   range, or a singular model
 * @see IEEE Std 1241-2010, §4.1.4.2 (three-parameter least-squares fit), extended to several
 *   known frequencies as in §4.5
 */
export function fitSinusoids(x: Float64Array, sampleRate: number, frequenciesHz: readonly number[]): SinusoidFit {
  const fn = 'fitSinusoids';
  precondition(x.length >= 8, fn, `record must hold at least 8 samples (got ${x.length})`);
  requirePositive(sampleRate, fn, 'sampleRate');
  precondition(frequenciesHz.length >= 1, fn, 'give at least one frequency');
  const n = x.length;
  const binHz = sampleRate / n;
  for (const f of frequenciesHz) {
    precondition(f > 0 && f < sampleRate / 2 - binHz, fn, `frequency ${f} Hz must lie in (0, fs/2 − fs/N) = (0, ${sampleRate / 2 - binHz})`);
  }
  // Columns: distinct frequencies (within one bin), each requested frequency mapped to one.
  const columns: number[] = [];
  const columnOf = frequenciesHz.map((f) => {
    const found = columns.findIndex((g) => Math.abs(g - f) < binHz);
    if (found >= 0) return found;
    columns.push(f);
    return columns.length - 1;
  });
  const k = columns.length;
  const omega = columns.map((f) => (2 * Math.PI * f) / sampleRate);
  const size = k + 1;
  const cosMatrix = new Float64Array(size * size);
  const sinMatrix = new Float64Array(k * k);
  const cosRhs = new Float64Array(size);
  const sinRhs = new Float64Array(k);
  // index 0 of the cosine block: DC (ω = 0)
  const w = (i: number): number => (i === 0 ? 0 : (omega[i - 1] as number));
  for (let i = 0; i < size; i++) {
    for (let j = 0; j < size; j++) {
      const diff = cosineSum(w(i) - w(j), n);
      const sum = cosineSum(w(i) + w(j), n);
      cosMatrix[i * size + j] = i === 0 && j === 0 ? n : i === 0 || j === 0 ? sum : 0.5 * (diff + sum);
      if (i >= 1 && j >= 1) sinMatrix[(i - 1) * k + (j - 1)] = 0.5 * (diff - sum);
    }
  }
  let total = 0;
  for (let i = 0; i < n; i++) total += x[i] as number;
  cosRhs[0] = total;
  for (let i = 0; i < k; i++) {
    const [pc, ps] = project(x, omega[i] as number);
    cosRhs[i + 1] = pc;
    sinRhs[i] = ps;
  }
  const cosSolution = solveLinearSystem(cosMatrix, cosRhs, size);
  const sinSolution = solveLinearSystem(sinMatrix, sinRhs, k);
  precondition(cosSolution !== null && sinSolution !== null, fn, `the model is singular for ${k} frequencies and N = ${n}`);
  const components = frequenciesHz.map((frequencyHz, i) => {
    const c = columnOf[i] as number;
    const a = cosSolution[c + 1] as number;
    const b = sinSolution[c] as number;
    return { frequencyHz, amplitude: Math.hypot(a, b), a, b, column: c };
  });
  return { dc: cosSolution[0] as number, components };
}

/**
 * Subtracts fitted sinusoids (and optionally the DC) from `x`, in place; each distinct
 * frequency once, even when the fit merged several requested frequencies into it.
 * @param which components to subtract (default all)
 * @throws RangeError on a non-positive sample rate
 * @see IEEE Std 1241-2010 §4.1.4 (residual of a fitted record)
 */
export function subtractSinusoids(x: Float64Array, sampleRate: number, fit: SinusoidFit, which: (component: SinusoidComponent) => boolean = () => true, removeDc = true): Float64Array {
  requirePositive(sampleRate, 'subtractSinusoids', 'sampleRate');
  if (removeDc) for (let i = 0; i < x.length; i++) x[i] = (x[i] as number) - fit.dc;
  const done = new Set<number>();
  for (const comp of fit.components) {
    if (!which(comp) || done.has(comp.column)) continue;
    done.add(comp.column);
    subtractSinusoid(x, (2 * Math.PI * comp.frequencyHz) / sampleRate, comp.a, comp.b);
  }
  return x;
}
