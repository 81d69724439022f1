import { unwrapPhase } from '../spectrum/unwrap.js';
import type { ChannelTransfer } from '../context/capture-context.js';

/** Octave fraction of the grid the group delay is taken on (see groupDelayVariation); the report and the check share it. */
export const GROUP_DELAY_GRID_FRACTION = 24;

/** The unwrapped phase of H over a band, its |H|-weighted best-fit line, and what is left. */
export interface PhaseFit {
  bandHz: [number, number];
  /** Frequencies of the bins used (stimulus energy, inside the band), Hz. */
  hz: Float64Array;
  /** Unwrapped phase minus the fitted line, radians. */
  residual: Float64Array;
  /** |H| per bin, the fit's weights. */
  weight: Float64Array;
  /** Mean group delay from the line's slope, −β/(2π), seconds, latency included. */
  meanDelaySeconds: number;
  /** Largest |residual|, degrees, and where. */
  maxDeviationDeg: number;
  maxDeviationHz: number;
}

/**
 * Weighted least-squares line φ ≈ α + β·f through the unwrapped phase of H over the band (the
 * caller's, else where |H| is within `rangeDb` of its maximum, bins with stimulus energy only),
 * with weights |H| — the same selection, unwrapping and fit as `summarizeTransfer`, keeping the
 * per-bin residual. Null when fewer than 3 bins qualify.
 * @throws nothing: an empty band yields null
 * @see Oppenheim & Schafer §5.1 (linear phase, group delay); numpy.unwrap semantics
 */
export function fitLinearPhase(t: ChannelTransfer, sampleRate: number, bandHz?: readonly [number, number], rangeDb = 20): PhaseFit | null {
  const { tf, mag2 } = t;
  let max = 0;
  for (let k = 1; k < mag2.length; k++) if (tf.valid[k] && (mag2[k] as number) > max) max = mag2[k] as number;
  const floor = max * 10 ** (-rangeDb / 10);
  const bins: number[] = [];
  for (let k = 1; k < mag2.length; k++) {
    if (!tf.valid[k]) continue;
    const f = k * tf.binHz;
    if (bandHz ? f >= bandHz[0] && f <= bandHz[1] : (mag2[k] as number) >= floor && (mag2[k] as number) > 0) bins.push(k);
  }
  const m = bins.length;
  if (m < 3) return null;
  const hz = Float64Array.from(bins, (k) => k * tf.binHz);
  const phase = Float64Array.from(bins, (k) => Math.atan2(tf.im[k] as number, tf.re[k] as number));
  const weight = Float64Array.from(bins, (k) => Math.sqrt(mag2[k] as number));
  unwrapPhase(phase, phase);
  let sw = 0, sf = 0, sp = 0, sff = 0, sfp = 0;
  for (let i = 0; i < m; i++) {
    const w = weight[i] as number;
    const f = hz[i] as number;
    const p = phase[i] as number;
    sw += w;
    sf += w * f;
    sp += w * p;
    sff += w * f * f;
    sfp += w * f * p;
  }
  const det = sw * sff - sf * sf;
  const beta = det !== 0 ? (sw * sfp - sf * sp) / det : 0;
  const alpha = sw > 0 ? (sp - beta * sf) / sw : 0;
  const residual = new Float64Array(m);
  let worst = 0;
  for (let i = 0; i < m; i++) {
    residual[i] = (phase[i] as number) - (alpha + beta * (hz[i] as number));
    if (Math.abs(residual[i] as number) > Math.abs(residual[worst] as number)) worst = i;
  }
  return {
    bandHz: [hz[0] as number, hz[m - 1] as number],
    hz,
    residual,
    weight,
    meanDelaySeconds: -beta / (2 * Math.PI) + t.latencySamples / sampleRate,
    maxDeviationDeg: (Math.abs(residual[worst] as number) * 180) / Math.PI,
    maxDeviationHz: hz[worst] as number,
  };
}

/**
 * Largest deviation of the group delay from its mean over the fitted band, with the group delay
 * taken on a 1/N-octave grid: the phase residual is |H|-weighted-averaged in cells 1/N octave
 * wide, and τ − τ̄ = −Δresidual/(2π·Δf) between neighbouring cells. Per-bin differences would
 * turn a phase error ε of an estimate over a record of T seconds into group-delay noise of
 * order ε·T (0.016° over 1 s reads ±0.3 ms), so the grid sets the resolution instead.
 * @throws nothing: fewer than 2 cells yield null
 * @returns the deviation in seconds and the frequency (geometric mid-point of the two cells); null with fewer than 2 cells
 * @see Oppenheim & Schafer §5.1 (τ = −dφ/dω); fractional-octave smoothing as in Hatziantoniou & Mourjopoulos, JAES 48(4), 2000
 */
export function groupDelayVariation(fit: PhaseFit, fraction = 24): { seconds: number; atHz: number } | null {
  const step = Math.log(2) / fraction;
  const lo = fit.hz[0] as number;
  const cells = new Map<number, { w: number; f: number; r: number }>();
  for (let i = 0; i < fit.hz.length; i++) {
    const f = fit.hz[i] as number;
    const c = Math.floor(Math.log(f / lo) / step);
    const w = Math.max(fit.weight[i] as number, 1e-300);
    const cell = cells.get(c) ?? { w: 0, f: 0, r: 0 };
    cell.w += w;
    cell.f += w * f;
    cell.r += w * (fit.residual[i] as number);
    cells.set(c, cell);
  }
  const points = [...cells.entries()].sort((a, b) => a[0] - b[0]).map(([, c]) => ({ f: c.f / c.w, r: c.r / c.w }));
  if (points.length < 2) return null;
  let seconds = 0;
  let atHz = points[0]?.f ?? lo;
  for (let i = 1; i < points.length; i++) {
    const a = points[i - 1] as { f: number; r: number };
    const b = points[i] as { f: number; r: number };
    const dev = Math.abs((b.r - a.r) / (2 * Math.PI * (b.f - a.f)));
    if (dev > seconds) {
      seconds = dev;
      atHz = Math.sqrt(a.f * b.f);
    }
  }
  return { seconds, atHz };
}
