import type { LimitBreakpoint } from './limit-curve.js';

/** Level steps per dB of derived breakpoints (0.1 dB: what a reviewer reads and types). */
const STEPS_PER_DB = 10;
const LEVEL_STEP_DB = 1 / STEPS_PER_DB;
const EPS = 1e-9;

/**
 * `hz` to two significant digits (20, 21, … 99, 100, 110, … 9500, 10000, 11000 …), rounded
 * down, up or to the nearest. Plain two-digit rounding, not a preferred-number series: steps
 * of 1 % to 10 % of the value, and every value is easy to read and to type.
 */
export function twoDigitHz(hz: number, mode: 'down' | 'up' | 'nearest'): number {
  const e = Math.floor(Math.log10(hz)) - 1;
  // Scale by a power of ten held exactly (10**e for e ≥ 0, division by 10**−e otherwise).
  const scaled = e >= 0 ? hz / 10 ** e : hz * 10 ** -e;
  const r = mode === 'down' ? Math.floor(scaled + EPS) : mode === 'up' ? Math.ceil(scaled - EPS) : Math.round(scaled);
  return e >= 0 ? r * 10 ** e : r / 10 ** -e;
}

/** Rounds outward (side +1 up, −1 down) to LEVEL_STEP_DB, so rounding never tightens a limit. */
const outwardDb = (db: number, side: 1 | -1) => (side === 1 ? Math.ceil(db * STEPS_PER_DB - EPS) : Math.floor(db * STEPS_PER_DB + EPS)) / STEPS_PER_DB;

/** How far (dB) the straight line (xa, ya)–(xb, yb) falls inside `raw` (side +1: below it) over grid points in [xa, xb]; ≤ 0 when it bounds. */
function shortfall(x: Float64Array, raw: Float64Array, xa: number, ya: number, xb: number, yb: number, side: 1 | -1): number {
  const slope = (yb - ya) / (xb - xa);
  let need = -Infinity;
  for (let j = 0; j < x.length; j++) {
    const xj = x[j] as number;
    if (xj < xa || xj > xb) continue;
    need = Math.max(need, side * ((raw[j] as number) - (ya + slope * (xj - xa))));
  }
  return need;
}

/**
 * Breakpoints a reviewer trusts from the kept grid indices of a simplified limit: frequencies
 * to two significant digits (the ends rounded outward so the limit still spans the whole grid,
 * duplicates merged); each starts at the raw level of the point it was picked at and is moved
 * outward just enough to bound `raw` at every grid point (a breakpoint shared by two segments
 * takes the larger shift: a segment whose ends both moved by ≥ d moved by ≥ d everywhere), then
 * rounded outward to 0.1 dB; finally an interior point is dropped when the line past it stays
 * within 0.1 dB of it and still bounds `raw`, so a flat region is one segment. Never more
 * points than `kept`, never inside `raw` on the grid.
 */
export function roundedBoundingLimit(hz: Float64Array, raw: Float64Array, kept: readonly number[], side: 1 | -1): LimitBreakpoint[] {
  const last = hz.length - 1;
  const top = twoDigitHz(hz[last] as number, 'up');
  const freqs = [twoDigitHz(hz[0] as number, 'down')];
  const from = [kept[0] as number];
  for (const i of kept.slice(1, -1)) {
    const f = twoDigitHz(hz[i] as number, 'nearest');
    if (f > (freqs[freqs.length - 1] as number) && f < top) {
      freqs.push(f);
      from.push(i);
    }
  }
  freqs.push(top);
  from.push(kept[kept.length - 1] as number);

  const x = Float64Array.from(hz, Math.log10);
  /** Levels at `at` (log10 Hz) moved outward just enough that the polyline bounds `raw`. */
  const bounding = (at: readonly number[], db: readonly number[]): number[] => {
    const shift = new Float64Array(at.length);
    for (let s = 0; s + 1 < at.length; s++) {
      const need = Math.max(0, shortfall(x, raw, at[s] as number, db[s] as number, at[s + 1] as number, db[s + 1] as number, side));
      shift[s] = Math.max(shift[s] as number, need);
      shift[s + 1] = Math.max(shift[s + 1] as number, need);
    }
    return db.map((v, s) => v + side * (shift[s] as number));
  };
  // Each breakpoint keeps the level of the raw point it was picked at, moved to its rounded frequency.
  const fx = freqs.map(Math.log10);
  const db = bounding(fx, from.map((i) => raw[i] as number));
  const level = db.map((v) => outwardDb(v, side));

  const out = [0];
  for (let s = 1; s + 1 < freqs.length; s++) {
    const p = out[out.length - 1] as number;
    const [xp, yp, xn, yn] = [fx[p] as number, level[p] as number, fx[s + 1] as number, level[s + 1] as number];
    const onLine = yp + ((yn - yp) * ((fx[s] as number) - xp)) / (xn - xp);
    const collinear = Math.abs((level[s] as number) - onLine) <= LEVEL_STEP_DB + EPS;
    if (!(collinear && shortfall(x, raw, xp, yp, xn, yn, side) <= EPS)) out.push(s);
  }
  out.push(freqs.length - 1);
  return out.map((s) => ({ hz: freqs[s] as number, db: level[s] as number }));
}
