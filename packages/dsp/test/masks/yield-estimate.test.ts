// The yield estimate of a derived envelope, checked against a simulation (issue 14, "Must show"):
// golden units are drawn from a known Gaussian per-frequency deviation (σ varying with frequency,
// correlated over about 1/6 octave), the envelope is derived from N = 20 of them, and the estimated
// false-reject rate is compared with the rate counted on 1,000 further simulated good units
// judged against the derived limits. Reference values: Wilson intervals from the closed form
// (Wilson 1927), Student's t quantiles from standard tables.
import { describe, expect, it } from 'vitest';
import { createSeededRandom, estimateYield, limitsFromCurves, sampleLimit, studentTUpperTail, wilsonInterval, type SeededRandom } from '../../src/index.js';
import { refusedBy } from '../helpers/refused.js';

/** 20 Hz … 20 kHz at 48 points per octave (what a smoothed curve resolves). */
const POINTS_PER_OCTAVE = 48;
const HZ = Float64Array.from({ length: Math.floor(Math.log2(1000) * POINTS_PER_OCTAVE) + 1 }, (_, i) => 20 * 2 ** (i / POINTS_PER_OCTAVE));
/** The good units' mean response: a gentle low and high roll-off, dB. */
const MEAN = Float64Array.from(HZ, (f) => -3 / (1 + (f / 40) ** 2) - 3 / (1 + (12000 / f) ** -4));
/** Their true σ per frequency: 0.3 dB in the midrange rising to 1.0 dB at both ends. */
const SIGMA = Float64Array.from(HZ, (f) => 0.3 + 0.7 * (Math.log2(f / 632) / 5) ** 2);
/** Deviations are a moving average of white noise over 1/6 octave: correlated across neighbouring frequencies. */
const CORRELATION_POINTS = POINTS_PER_OCTAVE / 6;

/** One good unit: MEAN + SIGMA·z, z a unit-variance Gaussian process correlated over CORRELATION_POINTS. */
function goodUnit(rng: SeededRandom): Float64Array {
  const white = Float64Array.from({ length: HZ.length + CORRELATION_POINTS - 1 }, () => rng.nextGaussian());
  const scale = 1 / Math.sqrt(CORRELATION_POINTS);
  return Float64Array.from(HZ, (_, j) => {
    let s = 0;
    for (let w = 0; w < CORRELATION_POINTS; w++) s += white[j + w] as number;
    return (MEAN[j] as number) + (SIGMA[j] as number) * s * scale;
  });
}

const units = (rng: SeededRandom, n: number) => Array.from({ length: n }, () => goodUnit(rng));

/** Fraction of `population` outside limits derived from `golden`, with the guard band at `guardDb`. */
function countedRate(golden: Float64Array[], population: Float64Array[], settings: { k: number; guardDb: number; maxSegments: number }): number {
  const limits = limitsFromCurves(HZ, golden, settings);
  const upper = sampleLimit(limits.upper, HZ);
  const lower = sampleLimit(limits.lower, HZ);
  const fails = population.filter((u) => u.some((x, j) => x > (upper[j] as number) || x < (lower[j] as number))).length;
  return fails / population.length;
}

const SETTINGS = { k: 3, guardDb: 0.5, maxSegments: 12 };

describe('wilsonInterval', () => {
  it('matches the closed form (Wilson 1927) at 1 of 10 and 0 of 20', () => {
    const one = wilsonInterval(1, 10);
    expect(one.low).toBeCloseTo(0.01787, 4);
    expect(one.high).toBeCloseTo(0.40415, 4);
    // 0 failures: the interval is [0, z²/(n + z²)], not empty as the normal approximation's.
    const none = wilsonInterval(0, 20);
    expect(none.low).toBe(0);
    expect(none.high).toBeCloseTo(3.84146 / 23.84146, 5);
  });

  it('refuses a count outside 0…n', () => {
    expect(() => wilsonInterval(3, 2)).toThrow(refusedBy('wilsonInterval'));
  });
});

describe('studentTUpperTail', () => {
  it('matches tabulated t quantiles (odd and even degrees of freedom) and the closed forms at 1 and 2', () => {
    // ν = 1 (Cauchy): P(T > t) = 1/2 − atan(t)/π; ν = 2: (1 − t/√(2 + t²))/2.
    expect(studentTUpperTail(3, 1)).toBeCloseTo(0.5 - Math.atan(3) / Math.PI, 14);
    expect(studentTUpperTail(3, 2)).toBeCloseTo((1 - 3 / Math.sqrt(11)) / 2, 14);
    // Two-sided 5 % and 1 % points: t(0.975, 19) = 2.093024, t(0.995, 20) = 2.845340.
    expect(studentTUpperTail(2.093024, 19)).toBeCloseTo(0.025, 6);
    expect(studentTUpperTail(2.84534, 20)).toBeCloseTo(0.005, 6);
    expect(studentTUpperTail(-2.093024, 19)).toBeCloseTo(0.975, 6);
    // Many degrees of freedom approach the normal tail: Q(3) = 1.3499e-3.
    expect(studentTUpperTail(3, 100001)).toBeCloseTo(1.3499e-3, 5);
    expect(studentTUpperTail(0, 7)).toBeCloseTo(0.5, 14);
  });
});

describe('estimateYield against a simulation (N = 20 golden units, 1,000 further good units)', () => {
  const rng = createSeededRandom(1409);
  const golden = units(rng, 20);
  const population = units(rng, 1000);
  const estimate = estimateYield(HZ, golden, { ...SETTINGS, bandsPerOctave: 6 });

  it('agrees with the rate counted on 1,000 good units at the requested guard band', () => {
    const counted = countedRate(golden, population, SETTINGS);
    const loo = estimate.leaveOneOut!;
    console.info(`yield simulation: counted ${counted}, leave-one-out ${loo.failures}/${loo.n} [${loo.low.toFixed(3)}, ${loo.high.toFixed(3)}], parametric ${estimate.parametric.rate.toFixed(4)} (${estimate.parametric.correlatedBound.toFixed(4)} … ${estimate.parametric.independentBound.toFixed(4)}, ${estimate.parametric.effectiveBands} bands)`);
    expect(loo.n).toBe(20);
    expect(counted).toBeGreaterThanOrEqual(loo.low);
    expect(counted).toBeLessThanOrEqual(loo.high);
    expect(counted).toBeGreaterThanOrEqual(estimate.parametric.correlatedBound);
    expect(counted).toBeLessThanOrEqual(estimate.parametric.independentBound);
  });

  it('tabulates 0…3 dB of guard band; each point agrees with a re-derivation at that guard band', () => {
    expect(estimate.byGuardBandDb.map((g) => g.guardDb)).toEqual(Array.from({ length: 31 }, (_, i) => i / 10));
    const rows: string[] = [];
    for (const guardDb of [0, 0.2, 0.5, 1]) {
      const row = estimate.byGuardBandDb.find((g) => Math.abs(g.guardDb - guardDb) < 1e-9)!;
      const counted = countedRate(golden, population, { ...SETTINGS, guardDb });
      rows.push(`guard ${guardDb} dB: counted ${counted}, leave-one-out ${row.leaveOneOut!.rate} [${row.leaveOneOut!.low.toFixed(3)}, ${row.leaveOneOut!.high.toFixed(3)}], parametric ${row.parametric.rate.toFixed(4)}`);
      // Shifting the margins is a re-derivation with that guard band (up to the 0.1 dB rounding).
      const direct = estimateYield(HZ, golden, { ...SETTINGS, guardDb, guardBandsDb: [] });
      expect(row.leaveOneOut!.failures).toBe(direct.leaveOneOut!.failures);
      expect(Math.abs(row.parametric.rate - direct.parametric.rate)).toBeLessThan(0.01);
    }
    console.info(`yield simulation by guard band:\n${rows.join('\n')}`);
    const rates = estimate.byGuardBandDb.map((g) => g.parametric.rate);
    for (let i = 1; i < rates.length; i++) expect(rates[i]).toBeLessThanOrEqual(rates[i - 1] as number);
  });
});

describe('estimateYield over 20 independent simulations (same population model, new golden units each)', () => {
  it('leave-one-out is unbiased on average and its Wilson interval covers the counted rate in most draws; the parametric rate is conservative', () => {
    const rows = Array.from({ length: 20 }, (_, r) => {
      const rng = createSeededRandom(7000 + r);
      const golden = units(rng, 20);
      const est = estimateYield(HZ, golden, { ...SETTINGS, guardBandsDb: [] });
      const counted = countedRate(golden, units(rng, 1000), SETTINGS);
      const loo = est.leaveOneOut!;
      return { counted, loo: loo.rate, covered: counted >= loo.low && counted <= loo.high, parametric: est.parametric.rate };
    });
    const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
    const counted = mean(rows.map((r) => r.counted));
    const loo = mean(rows.map((r) => r.loo));
    const parametric = mean(rows.map((r) => r.parametric));
    const covered = rows.filter((r) => r.covered).length;
    console.info(`yield simulation, 20 draws: mean counted ${counted.toFixed(4)}, mean leave-one-out ${loo.toFixed(4)}, mean parametric ${parametric.toFixed(4)}, counted inside the Wilson interval in ${covered}/20`);
    // A 95 % interval should cover the truth in about 19 of 20 draws; 16 leaves room for the
    // interval's own coverage error at N = 20 and for the spread of the counted rate itself.
    expect(covered).toBeGreaterThanOrEqual(16);
    // Leave-one-out is unbiased: the mean of 400 trials lies within two standard errors,
    // 2·√(p(1 − p)/400) ≈ 0.011 at p ≈ 1.3 %, of the counted rate (measured: 0.75 % vs 0.98 %).
    expect(Math.abs(loo - counted)).toBeLessThan(0.011);
    // The parametric rate errs on the safe side here: above the counted rate, by less than 3×
    // (measured 2.86 % vs 0.98 %; independent 1/6-octave bands overcount a process correlated over 1/6 octave).
    expect(parametric).toBeGreaterThan(counted);
    expect(parametric).toBeLessThan(3 * counted);
  });
});

describe('estimateYield: edge cases', () => {
  it('gives no leave-one-out with two golden curves, and 0 % parametric when σ = 0 and the limits hold the mean', () => {
    const flat = [Float64Array.from(HZ, () => 0), Float64Array.from(HZ, () => 0)];
    const est = estimateYield(HZ, flat, { ...SETTINGS, guardBandsDb: [0, 0.5] });
    expect(est.leaveOneOut).toBeNull();
    expect(est.parametric).toMatchObject({ rate: 0, correlatedBound: 0, independentBound: 0 });
  });

  it('refuses negative guard bands', () => {
    expect(() => estimateYield(HZ, units(createSeededRandom(1), 3), { ...SETTINGS, guardBandsDb: [-1] })).toThrow(refusedBy('estimateYield'));
  });
});
