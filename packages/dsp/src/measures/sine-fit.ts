import { solveLinearSystem } from '../util/linear-solve.js';
import { precondition, requirePositive } from '../util/preconditions.js';
import { EngineInputError } from '../util/engine-input-error.js';

// NOTE: all fits use the centred time index t = n − (N−1)/2. Over a grid symmetric about 0,
// Σ sin(a·t)·cos(b·t) = 0 and the phase and frequency columns decorrelate, which keeps the
// normal equations well conditioned for records of millions of samples.

/** Phasors are rotated by recurrence and re-seeded exactly this often (bounds drift to ~1e-13). */
const RESEED = 2048;

/** Result of the four-parameter sine fit. */
export interface SineFit {
  frequencyHz: number;
  /** Peak amplitude √(a² + b²). */
  amplitude: number;
  /** x ≈ dc + a·cos(ωt) + b·sin(ωt), t = n − (N−1)/2 */
  a: number;
  b: number;
  dc: number;
  iterations: number;
}

/** One fitted harmonic, x_k(t) = a·cos(kωt) + b·sin(kωt), t = n − (N−1)/2. */
export interface HarmonicComponent {
  harmonic: number;
  frequencyHz: number;
  amplitude: number;
  a: number;
  b: number;
}

/** Joint least-squares fit of DC and harmonics 1…K at a fixed fundamental frequency. */
export interface HarmonicFit {
  fundamentalHz: number;
  dc: number;
  /** Harmonic 1 (the fundamental) first; only harmonics below Nyquist. */
  components: HarmonicComponent[];
}

/** Σ_t cos(θ·t) over t = −(N−1)/2 … (N−1)/2 (the Dirichlet kernel), with its limit at sin(θ/2) = 0. */
export function cosineSum(theta: number, n: number): number {
  const s = Math.sin(theta / 2);
  if (Math.abs(s) < 1e-13) return (n * Math.cos((n * theta) / 2)) / Math.cos(theta / 2);
  return Math.sin((n * theta) / 2) / s;
}

/**
 * Σ x·cos(ωt) and Σ x·sin(ωt) in one tight pass; the phasor is rotated by e^{iω} and re-seeded
 * exactly every RESEED samples.
 */
export function project(x: Float64Array, omega: number): [number, number] {
  const n = x.length;
  const t0 = -(n - 1) / 2;
  const cw = Math.cos(omega);
  const sw = Math.sin(omega);
  let sc = 0;
  let ss = 0;
  for (let start = 0; start < n; start += RESEED) {
    const end = Math.min(n, start + RESEED);
    const phase = omega * (t0 + start);
    let c = Math.cos(phase);
    let s = Math.sin(phase);
    for (let i = start; i < end; i++) {
      const v = x[i] as number;
      sc += v * c;
      ss += v * s;
      const nc = c * cw - s * sw;
      s = s * cw + c * sw;
      c = nc;
    }
  }
  return [sc, ss];
}

/** x[n] −= a·cos(ωt) + b·sin(ωt), in place, same recurrence as `project`. */
export function subtractSinusoid(x: Float64Array, omega: number, a: number, b: number): void {
  const n = x.length;
  const t0 = -(n - 1) / 2;
  const cw = Math.cos(omega);
  const sw = Math.sin(omega);
  for (let start = 0; start < n; start += RESEED) {
    const end = Math.min(n, start + RESEED);
    const phase = omega * (t0 + start);
    let c = Math.cos(phase);
    let s = Math.sin(phase);
    for (let i = start; i < end; i++) {
      x[i] = (x[i] as number) - a * c - b * s;
      const nc = c * cw - s * sw;
      s = s * cw + c * sw;
      c = nc;
    }
  }
}

/**
 * Four-parameter least-squares sine fit (amplitude, phase, offset, frequency) by Gauss–Newton
 * iteration from an initial frequency: each step linearises the model in ω and solves a 4×4
 * normal-equation system; it stops when the phase change over the record falls below 1e-11 rad.
 * @param x record, N ≥ 8 samples
 * @param initialFrequencyHz start value within about half a DFT bin of the tone (e.g. from
 *   an interpolated FFT peak)
 * @throws RangeError on a short record, a non-positive rate, or a start frequency outside
 *   (0, fs/2)
 * @see IEEE Std 1241-2010, §4.1.4.3 "Four-parameter (general) least-squares fit";
 *   IEEE Std 1057-2017, annex A
 */
export function fitSineFourParameter(x: Float64Array, sampleRate: number, initialFrequencyHz: number, maxIterations = 30): SineFit {
  const fn = 'fitSineFourParameter';
  precondition(x.length >= 8, fn, `record must hold at least 8 samples (got ${x.length})`);
  requirePositive(sampleRate, fn, 'sampleRate');
  precondition(initialFrequencyHz > 0 && initialFrequencyHz < sampleRate / 2, fn, `initialFrequencyHz must lie in (0, fs/2) (got ${initialFrequencyHz})`);
  const n = x.length;
  const t0 = -(n - 1) / 2;
  let omega = (2 * Math.PI * initialFrequencyHz) / sampleRate;
  // Three-parameter fit at the start frequency gives a and b for the first linearisation.
  let [a, b, dc] = threeParameter(x, omega);
  const m = new Float64Array(16);
  const r = new Float64Array(4);
  let iterations = 0;
  for (; iterations < maxIterations; iterations++) {
    // Columns: cos, sin, 1, d = t·(−a·sin + b·cos)
    let cc = 0, cs = 0, c1 = 0, cd = 0, ssum = 0, s1 = 0, sd = 0, dd = 0, d1 = 0;
    let xc = 0, xs = 0, x1 = 0, xd = 0;
    const cw = Math.cos(omega);
    const sw = Math.sin(omega);
    for (let start = 0; start < n; start += RESEED) {
      const end = Math.min(n, start + RESEED);
      let c = Math.cos(omega * (t0 + start));
      let s = Math.sin(omega * (t0 + start));
      for (let i = start; i < end; i++) {
        const t = t0 + i;
        const v = x[i] as number;
        const d = t * (b * c - a * s);
        cc += c * c;
        cs += c * s;
        c1 += c;
        cd += c * d;
        ssum += s * s;
        s1 += s;
        sd += s * d;
        dd += d * d;
        d1 += d;
        xc += v * c;
        xs += v * s;
        x1 += v;
        xd += v * d;
        const nc = c * cw - s * sw;
        s = s * cw + c * sw;
        c = nc;
      }
    }
    m.set([cc, cs, c1, cd, cs, ssum, s1, sd, c1, s1, n, d1, cd, sd, d1, dd]);
    r.set([xc, xs, x1, xd]);
    const solution = solveLinearSystem(m, r, 4);
    if (solution === null) break;
    a = solution[0] as number;
    b = solution[1] as number;
    dc = solution[2] as number;
    const step = solution[3] as number;
    omega += step;
    if (!(omega > 0 && omega < Math.PI)) throw new EngineInputError(fn, `the sine fit diverged: no dominant tone near ${initialFrequencyHz} Hz`);
    if (Math.abs(step) * n < 1e-11) {
      iterations++;
      break;
    }
  }
  // Final linear fit at the converged frequency.
  [a, b, dc] = threeParameter(x, omega);
  return { frequencyHz: (omega * sampleRate) / (2 * Math.PI), amplitude: Math.hypot(a, b), a, b, dc, iterations };
}

/** Three-parameter fit (known ω): closed-form normal matrix; cos and sin blocks decouple except through DC. */
function threeParameter(x: Float64Array, omega: number): [number, number, number] {
  const n = x.length;
  const [xc, xs] = project(x, omega);
  let x1 = 0;
  for (let i = 0; i < n; i++) x1 += x[i] as number;
  const sc = cosineSum(omega, n);
  const cc = 0.5 * (n + cosineSum(2 * omega, n));
  const ss = 0.5 * (n - cosineSum(2 * omega, n));
  // [cc sc; sc n]·[a; dc] = [xc; x1], and ss·b = xs (Σ sin·cos = Σ sin = 0 on a symmetric grid)
  const det = cc * n - sc * sc;
  const a = (xc * n - sc * x1) / det;
  const dc = (cc * x1 - sc * xc) / det;
  return [a, xs / ss, dc];
}

/**
 * Joint linear least-squares fit of DC and the harmonics k·f0, k = 1…K (those below
 * fs/2 − fs/N), at a known fundamental frequency. The normal matrix is formed in closed form
 * (sums of cosines over a symmetric grid); only the K projections Σx·cos, Σx·sin cost O(N·K).
 * @throws RangeError on a short record, bad rate or frequency, or K < 1
 * @see IEEE Std 1241-2010, §4.1.4.2 (three-parameter fit), extended to harmonic terms as in
 *   §4.5 (harmonic distortion from a fitted record)
 */
export function fitHarmonics(x: Float64Array, sampleRate: number, fundamentalHz: number, harmonics = 10): HarmonicFit {
  const fn = 'fitHarmonics';
  precondition(x.length >= 8, fn, `record must hold at least 8 samples (got ${x.length})`);
  requirePositive(sampleRate, fn, 'sampleRate');
  precondition(fundamentalHz > 0 && fundamentalHz < sampleRate / 2, fn, `fundamentalHz must lie in (0, fs/2) (got ${fundamentalHz})`);
  precondition(Number.isInteger(harmonics) && harmonics >= 1, fn, `harmonics must be an integer ≥ 1 (got ${harmonics})`);
  const n = x.length;
  const omega = (2 * Math.PI * fundamentalHz) / sampleRate;
  const limit = Math.PI - (2 * Math.PI) / n; // keep a bin's distance from Nyquist, where sin(πt) vanishes
  let k = 0;
  while (k < harmonics && (k + 1) * omega < limit) k++;
  const size = 1 + k;
  const cosMatrix = new Float64Array(size * size);
  const sinMatrix = new Float64Array(k * k);
  const cosRhs = new Float64Array(size);
  const sinRhs = new Float64Array(k);
  // index 0: DC; index h (1…k): harmonic h
  const freq = (h: number): number => h * omega;
  for (let i = 0; i < size; i++) {
    for (let j = 0; j < size; j++) {
      const di = cosineSum(freq(i) - freq(j), n);
      const si = cosineSum(freq(i) + freq(j), n);
      cosMatrix[i * size + j] = i === 0 && j === 0 ? n : i === 0 || j === 0 ? cosineSum(freq(i) + freq(j), n) : 0.5 * (di + si);
      if (i >= 1 && j >= 1) sinMatrix[(i - 1) * k + (j - 1)] = 0.5 * (di - si);
    }
  }
  let sum = 0;
  for (let i = 0; i < n; i++) sum += x[i] as number;
  cosRhs[0] = sum;
  for (let h = 1; h <= k; h++) {
    const [pc, ps] = project(x, freq(h));
    cosRhs[h] = pc;
    sinRhs[h - 1] = ps;
  }
  const cosSolution = solveLinearSystem(cosMatrix, cosRhs, size);
  const sinSolution = solveLinearSystem(sinMatrix, sinRhs, k);
  if (cosSolution === null || sinSolution === null) throw new EngineInputError(fn, `the harmonic fit cannot be solved for a fundamental of ${fundamentalHz} Hz over ${n} samples`);
  const components: HarmonicComponent[] = [];
  for (let h = 1; h <= k; h++) {
    const a = cosSolution[h] as number;
    const b = sinSolution[h - 1] as number;
    components.push({ harmonic: h, frequencyHz: h * fundamentalHz, amplitude: Math.hypot(a, b), a, b });
  }
  return { fundamentalHz, dc: cosSolution[0] as number, components };
}

/**
 * Subtracts a fitted model (DC and the chosen harmonics) from `x`, in place.
 * @param which harmonics to subtract (default all of the fit's)
 * @throws RangeError on a non-positive sample rate
 */
export function subtractHarmonics(x: Float64Array, sampleRate: number, fit: HarmonicFit, which: (harmonic: number) => boolean = () => true, removeDc = true): Float64Array {
  requirePositive(sampleRate, 'subtractHarmonics', 'sampleRate');
  const omega = (2 * Math.PI * fit.fundamentalHz) / sampleRate;
  if (removeDc) for (let i = 0; i < x.length; i++) x[i] = (x[i] as number) - fit.dc;
  for (const c of fit.components) {
    if (which(c.harmonic)) subtractSinusoid(x, c.harmonic * omega, c.a, c.b);
  }
  return x;
}
