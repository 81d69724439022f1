import { precondition } from '../util/preconditions.js';
import { studentTUpperTail } from './student-t.js';

/** A run of adjacent frequency bands where a golden curve lies beyond 3σ of the others. */
export interface OutlierRegion {
  /** Lowest and highest measured frequency of the run, Hz. */
  fromHz: number;
  toHz: number;
  /** At the run's worst band: the curve's band mean minus the others' mean there, dB. */
  deviationDb: number;
  /** The same in standard deviations of the others (σ floored at `floorDb`). */
  sigmas: number;
  /** Centre (geometric mean of its frequencies) of the worst band, Hz. */
  atHz: number;
}

/** A golden curve that deviates from the others, and where. */
export interface GoldenOutlier {
  /** Index of the curve in the input. */
  index: number;
  /** Flagged runs, ascending in frequency. */
  regions: OutlierRegion[];
  /** The region with the largest |sigmas|. */
  worst: OutlierRegion;
}

export interface GoldenOutlierOptions {
  /** Width of the bands compared, 1/N octave from the lowest frequency (default 6, the default smoothing). */
  bandsPerOctave?: number;
  /** How many σ of the others count as outlying for a single band under the normal model (default 3). */
  sigmas?: number;
  /** Smallest σ used, dB (default 0.05): identical captures (σ = 0) must not make rounding noise an outlier. */
  floorDb?: number;
}

/** Fewest other curves a curve is compared with (two degrees of freedom for σ). */
export const OUTLIER_MIN_OTHERS = 3;

/** Two-sided tail of the standard normal beyond `z` (erfc by its continued fraction, |z| ≥ 0). */
function normalTwoSided(z: number): number {
  // Abramowitz & Stegun 7.1.26 is too coarse at 3σ; integrate the density instead (Simpson, 2000 steps to z).
  const steps = 2000;
  const h = z / steps;
  let sum = 0;
  for (let i = 0; i <= steps; i++) {
    const x = i * h;
    const w = i === 0 || i === steps ? 1 : i % 2 === 1 ? 4 : 2;
    sum += w * Math.exp((-x * x) / 2);
  }
  const inner = ((h / 3) * sum) / Math.sqrt(2 * Math.PI);
  return Math.max(0, 1 - 2 * inner);
}

/**
 * Golden curves that do not look like the others. Frequencies are grouped into bands
 * 1/bandsPerOctave octave wide (from the lowest frequency) and each curve is averaged per band;
 * in each band a curve is compared with the mean m and sample σ of the OTHER curves (so an
 * outlier does not widen its own yardstick). With a few curves σ is itself uncertain, so
 * "beyond 3σ" is taken as the chance it stands for, not a fixed distance: a band is flagged when
 * the two-sided predictive Student-t tail of (x − m)/(σ·√(1 + 1/n)) (n others, n − 1 degrees of
 * freedom) is below the normal tail beyond `sigmas` (0.27 % for 3σ). With 7 others that is
 * 5.2σ of the others, with 4 others 9σ, with many others 3σ. Adjacent flagged bands are merged
 * into regions. Needs at least OUTLIER_MIN_OTHERS + 1 curves; with fewer it answers no outliers.
 * @throws RangeError when curves do not have one value per frequency, or on bad options
 * @see docs/masks.md, "Outlying golden captures"
 */
export function findGoldenOutliers(hz: Float64Array, curves: readonly Float64Array[], options: GoldenOutlierOptions = {}): GoldenOutlier[] {
  const fn = 'findGoldenOutliers';
  const bandsPerOctave = options.bandsPerOctave ?? 6;
  const sigmas = options.sigmas ?? 3;
  const floorDb = options.floorDb ?? 0.05;
  precondition(Number.isFinite(bandsPerOctave) && bandsPerOctave > 0, fn, `bandsPerOctave must be > 0 (got ${bandsPerOctave})`);
  precondition(Number.isFinite(sigmas) && sigmas > 0, fn, `sigmas must be > 0 (got ${sigmas})`);
  precondition(Number.isFinite(floorDb) && floorDb > 0, fn, `floorDb must be > 0 (got ${floorDb})`);
  precondition(hz.length >= 1 && curves.every((c) => c.length === hz.length), fn, `every curve must have one value per frequency (${hz.length})`);
  const n = curves.length - 1;
  if (n < OUTLIER_MIN_OTHERS) return [];

  // Bands: first and last index (inclusive) of each run of frequencies in one 1/N-octave band.
  const first = hz[0] as number;
  const bands: { from: number; to: number }[] = [];
  let current = Number.NaN;
  hz.forEach((f, j) => {
    const b = Math.floor(Math.log2(f / first) * bandsPerOctave + 1e-9);
    if (b !== current) {
      bands.push({ from: j, to: j });
      current = b;
    } else (bands[bands.length - 1] as { to: number }).to = j;
  });
  const bandMeans = curves.map((c) => bands.map(({ from, to }) => {
    let s = 0;
    for (let j = from; j <= to; j++) s += c[j] as number;
    return s / (to - from + 1);
  }));
  const centreOf = ({ from, to }: { from: number; to: number }) => {
    let s = 0;
    for (let j = from; j <= to; j++) s += Math.log(hz[j] as number);
    return Math.exp(s / (to - from + 1));
  };

  const allowed = normalTwoSided(sigmas);
  const predictive = Math.sqrt(1 + 1 / n);
  const outliers: GoldenOutlier[] = [];
  curves.forEach((_, i) => {
    // The others' mean and σ per band; σ is never taken below their median σ over the bands (a band
    // where the others happen to agree must not make an ordinary unit stand out) nor below floorDb.
    const stats = bands.map((_, b) => {
      let sum = 0;
      for (let r = 0; r < curves.length; r++) if (r !== i) sum += (bandMeans[r] as number[])[b] as number;
      const m = sum / n;
      let ss = 0;
      for (let r = 0; r < curves.length; r++) if (r !== i) ss += (((bandMeans[r] as number[])[b] as number) - m) ** 2;
      return { m, sd: Math.sqrt(ss / (n - 1)) };
    });
    const sorted = stats.map((x) => x.sd).sort((p, q) => p - q);
    const typical = sorted[Math.floor((sorted.length - 1) / 2)] as number;
    const regions: OutlierRegion[] = [];
    let open: OutlierRegion | null = null;
    bands.forEach((band, b) => {
      const { m } = stats[b] as { m: number; sd: number };
      const sd = Math.max(floorDb, typical, (stats[b] as { sd: number }).sd);
      const deviationDb = ((bandMeans[i] as number[])[b] as number) - m;
      const z = deviationDb / sd;
      const flagged = 2 * studentTUpperTail(Math.abs(z) / predictive, n - 1) < allowed;
      if (!flagged) {
        open = null;
        return;
      }
      const here = { fromHz: hz[band.from] as number, toHz: hz[band.to] as number, deviationDb, sigmas: z, atHz: centreOf(band) };
      if (open) {
        open.toHz = here.toHz;
        if (Math.abs(z) > Math.abs(open.sigmas)) Object.assign(open, { deviationDb, sigmas: z, atHz: here.atHz });
      } else {
        open = here;
        regions.push(open);
      }
    });
    if (regions.length > 0) {
      const worst = regions.reduce((w, r) => (Math.abs(r.sigmas) > Math.abs(w.sigmas) ? r : w));
      outliers.push({ index: i, regions, worst });
    }
  });
  return outliers;
}
