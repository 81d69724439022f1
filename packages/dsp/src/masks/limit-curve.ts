import { precondition } from '../util/preconditions.js';

/** A breakpoint of a limit curve (the shape of contracts' LimitPoint). */
export interface LimitBreakpoint {
  hz: number;
  db: number;
}

/**
 * Value of a piecewise-linear limit at `hz`: linear in dB over log frequency between the two
 * neighbouring breakpoints, db = db_a + (db_b − db_a)·log(f/f_a)/log(f_b/f_a); null outside
 * [first.hz, last.hz], where the limit does not apply. A straight segment on a log-frequency
 * plot is then a straight segment here too (a slope in dB per octave stays constant).
 * @throws RangeError when fewer than two breakpoints are given or frequencies do not strictly increase
 * @see docs/masks.md, "Limit curves"; linear interpolation on a logarithmic abscissa
 */
export function interpolateLimit(points: readonly LimitBreakpoint[], hz: number): number | null {
  const v = sampleLimit(points, Float64Array.of(hz))[0];
  return v === undefined || Number.isNaN(v) ? null : v;
}

/**
 * `interpolateLimit` at many ascending frequencies in one pass; NaN where the limit does not apply.
 * @throws RangeError as `interpolateLimit`, or when `frequencies` do not ascend
 * @see interpolateLimit
 */
export function sampleLimit(points: readonly LimitBreakpoint[], frequencies: Float64Array): Float64Array {
  const fn = 'sampleLimit';
  precondition(points.length >= 2, fn, `a limit needs at least two breakpoints (got ${points.length})`);
  for (let i = 1; i < points.length; i++) {
    precondition((points[i] as LimitBreakpoint).hz > (points[i - 1] as LimitBreakpoint).hz && (points[i - 1] as LimitBreakpoint).hz > 0, fn, 'breakpoint frequencies must be > 0 and strictly increase');
  }
  const out = new Float64Array(frequencies.length).fill(Number.NaN);
  const first = points[0] as LimitBreakpoint;
  const last = points[points.length - 1] as LimitBreakpoint;
  let seg = 1;
  let previous = -Infinity;
  for (let i = 0; i < frequencies.length; i++) {
    const f = frequencies[i] as number;
    precondition(f >= previous, fn, 'frequencies must ascend');
    previous = f;
    if (!(f >= first.hz && f <= last.hz)) continue;
    while (seg < points.length - 1 && f > (points[seg] as LimitBreakpoint).hz) seg++;
    const a = points[seg - 1] as LimitBreakpoint;
    const b = points[seg] as LimitBreakpoint;
    const t = Math.log(f / a.hz) / Math.log(b.hz / a.hz);
    out[i] = a.db + t * (b.db - a.db);
  }
  return out;
}
