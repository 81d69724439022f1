import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { createComplexFftPlan } from '../src/fft/complex-fft.js';
import { createRealFftPlan } from '../src/fft/real-fft.js';
import { expectAllClose, maxAbs } from './helpers/approx.js';
import { loadFixture } from './helpers/fixtures.js';
import { naiveDft } from './helpers/naive-dft.js';
import { refusedBy } from './helpers/refused.js';

interface FftFixture {
  rfft: { n: number; input: number[]; re: number[]; im: number[] }[];
  irfft: { n: number; re: number[]; im: number[]; output: number[] }[];
  fft: { n: number; re: number[]; im: number[]; fftRe: number[]; fftIm: number[]; ifftRe: number[]; ifftIm: number[] }[];
}
const fixture = loadFixture<FftFixture>('fft.json');

/**
 * Tolerance for one FFT output of a unit-variance input: the rounding error of a radix-2/4
 * FFT grows like ε·log2(N) relative to ‖x‖₂ = √N (Higham, "Accuracy and Stability of Numerical
 * Algorithms", §24.1); a factor of 50 covers the constant and the post-processing step.
 */
const fftTolerance = (n: number): number => 50 * Number.EPSILON * Math.max(1, Math.log2(n)) * Math.sqrt(n);

describe('real FFT against numpy.fft.rfft / irfft (fixtures from reference/generate_fixtures.py)', () => {
  for (const c of fixture.rfft) {
    it(`rfft N = ${c.n}`, () => {
      const plan = createRealFftPlan(c.n);
      const re = new Float64Array(plan.bins);
      const im = new Float64Array(plan.bins);
      plan.forward(Float64Array.from(c.input), re, im);
      // source: numpy.fft.rfft(x)
      expectAllClose(re, c.re, 0, fftTolerance(c.n));
      expectAllClose(im, c.im, 0, fftTolerance(c.n));
    });
  }
  for (const c of fixture.irfft) {
    it(`irfft N = ${c.n} (imaginary DC and Nyquist parts ignored, as numpy)`, () => {
      const plan = createRealFftPlan(c.n);
      const out = new Float64Array(c.n);
      plan.inverse(Float64Array.from(c.re), Float64Array.from(c.im), out);
      // source: numpy.fft.irfft(X, n); outputs scale like ‖X‖/N
      expectAllClose(out, c.output, 0, fftTolerance(c.n) / Math.sqrt(c.n));
    });
  }
});

describe('complex FFT against numpy.fft.fft / ifft', () => {
  for (const c of fixture.fft) {
    it(`fft and ifft N = ${c.n}`, () => {
      const plan = createComplexFftPlan(c.n);
      const input = new Float64Array(2 * c.n);
      for (let i = 0; i < c.n; i++) {
        input[2 * i] = c.re[i] as number;
        input[2 * i + 1] = c.im[i] as number;
      }
      const out = new Float64Array(2 * c.n);
      plan.forward(input, out);
      // source: numpy.fft.fft(z)
      expectAllClose(out.filter((_, i) => i % 2 === 0), c.fftRe, 0, fftTolerance(c.n) * Math.SQRT2);
      expectAllClose(out.filter((_, i) => i % 2 === 1), c.fftIm, 0, fftTolerance(c.n) * Math.SQRT2);
      plan.inverse(input, out);
      // source: numpy.fft.ifft(z)
      expectAllClose(out.filter((_, i) => i % 2 === 0), c.ifftRe, 0, fftTolerance(c.n) / Math.sqrt(c.n));
      expectAllClose(out.filter((_, i) => i % 2 === 1), c.ifftIm, 0, fftTolerance(c.n) / Math.sqrt(c.n));
    });
  }
});

const sizeArb = fc.integer({ min: 1, max: 7 }).map((p) => 2 ** p);
const signalOf = (n: number): fc.Arbitrary<Float64Array> =>
  fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: n, maxLength: n }).map((a) => Float64Array.from(a));
const sizedSignal = sizeArb.chain((n) => signalOf(n).map((x) => ({ n, x })));

describe('real FFT properties (fast-check)', () => {
  it('matches a naive O(N²) DFT for N = 2…128', () => {
    fc.assert(
      fc.property(sizedSignal, ({ n, x }) => {
        const plan = createRealFftPlan(n);
        const re = new Float64Array(plan.bins);
        const im = new Float64Array(plan.bins);
        plan.forward(x, re, im);
        const ref = naiveDft(x, new Float64Array(n));
        // The direct sum itself carries about N·ε error per bin; 1e-12 covers N ≤ 128 with margin.
        for (let k = 0; k < plan.bins; k++) {
          expect(Math.abs((re[k] as number) - (ref.re[k] as number))).toBeLessThan(1e-12);
          expect(Math.abs((im[k] as number) - (ref.im[k] as number))).toBeLessThan(1e-12);
        }
      }),
      { numRuns: 60 },
    );
  });

  it('round trip irfft(rfft(x)) = x to < 1e-12 relative error', () => {
    fc.assert(
      fc.property(sizedSignal, ({ n, x }) => {
        const plan = createRealFftPlan(n);
        const re = new Float64Array(plan.bins);
        const im = new Float64Array(plan.bins);
        const back = new Float64Array(n);
        plan.forward(x, re, im);
        plan.inverse(re, im, back);
        const scale = Math.max(maxAbs(x), 1e-300);
        for (let i = 0; i < n; i++) expect(Math.abs((back[i] as number) - (x[i] as number)) / scale).toBeLessThan(1e-12);
      }),
      { numRuns: 80 },
    );
  });

  it('is linear: F(a·x + y) = a·F(x) + F(y)', () => {
    fc.assert(
      fc.property(
        sizeArb.chain((n) => fc.tuple(signalOf(n), signalOf(n), fc.double({ min: -4, max: 4, noNaN: true }))),
        ([x, y, a]) => {
          const n = x.length;
          const plan = createRealFftPlan(n);
          const run = (s: Float64Array): Float64Array[] => {
            const re = new Float64Array(plan.bins);
            const im = new Float64Array(plan.bins);
            plan.forward(s, re, im);
            return [re, im];
          };
          const [fr, fi] = run(x.map((v, i) => a * v + (y[i] as number)));
          const [xr, xi] = run(x);
          const [yr, yi] = run(y);
          // Outputs are bounded by 5·N; rounding is a few ε of that.
          const tol = 1e-13 * n;
          for (let k = 0; k < plan.bins; k++) {
            expect(Math.abs((fr?.[k] as number) - (a * (xr?.[k] as number) + (yr?.[k] as number)))).toBeLessThan(tol);
            expect(Math.abs((fi?.[k] as number) - (a * (xi?.[k] as number) + (yi?.[k] as number)))).toBeLessThan(tol);
          }
        },
      ),
      { numRuns: 60 },
    );
  });

  it('keeps Parseval: Σx² = (1/N)·Σ|X|² to 1e-9 relative (one-sided bins counted twice)', () => {
    // source: Parseval's relation for the DFT, Oppenheim & Schafer, Discrete-Time Signal Processing, §8.6
    fc.assert(
      fc.property(sizedSignal, ({ n, x }) => {
        const plan = createRealFftPlan(n);
        const re = new Float64Array(plan.bins);
        const im = new Float64Array(plan.bins);
        plan.forward(x, re, im);
        let et = 0;
        for (const v of x) et += v * v;
        let ef = 0;
        for (let k = 0; k < plan.bins; k++) ef += (k === 0 || k === plan.bins - 1 ? 1 : 2) * ((re[k] as number) ** 2 + (im[k] as number) ** 2);
        ef /= n;
        if (et === 0) expect(ef).toBe(0);
        else expect(Math.abs(ef - et) / et).toBeLessThan(1e-9);
      }),
      { numRuns: 80 },
    );
  });
});

describe('FFT preconditions', () => {
  it('rejects sizes that are not powers of two and mismatched buffers, naming the function', () => {
    expect(() => createRealFftPlan(48)).toThrow(refusedBy('createRealFftPlan'));
    expect(() => createComplexFftPlan(1)).toThrow(refusedBy('createComplexFftPlan'));
    const plan = createRealFftPlan(8);
    expect(() => plan.forward(new Float64Array(7), new Float64Array(5), new Float64Array(5))).toThrow(refusedBy('RealFftPlan.forward', /^input must hold 8 samples \(got 7\)$/));
  });
});
