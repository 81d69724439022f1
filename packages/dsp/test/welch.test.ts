import { describe, it } from 'vitest';
import { welchCrossSpectrum, welchPsd, type WelchOptions } from '../src/spectrum/welch.js';
import { expectAllClose } from './helpers/approx.js';
import { loadFixture } from './helpers/fixtures.js';

interface WelchFixture {
  sampleRate: number;
  noise: number[];
  tone: number[];
  welch: (Required<WelchOptions> & { signal: 'noise' | 'tone'; binHz: number; psd: number[] })[];
  csd: { segmentLength: number; overlap: number; y: number[]; re: number[]; im: number[] };
}
const f = loadFixture<WelchFixture>('welch.json');

describe('welchPsd against scipy.signal.welch (fixtures)', () => {
  for (const c of f.welch) {
    it(`${c.signal}: ${c.window} nperseg ${c.segmentLength} noverlap ${c.overlap} detrend ${c.detrend} ${c.scaling}`, () => {
      const r = welchPsd(Float64Array.from(c.signal === 'noise' ? f.noise : f.tone), f.sampleRate, c);
      // source: scipy.signal.welch(...); same sums in a different order: 1e-10 relative, with an
      // absolute floor 1e-12 of the largest value for bins near zero.
      const peak = Math.max(...c.psd);
      expectAllClose(r.psd, c.psd, 1e-10, 1e-12 * peak);
      expectAllClose([r.binHz], [c.binHz], 1e-12);
    });
  }
  it('cross spectrum against scipy.signal.csd (conj(X)·Y convention)', () => {
    const r = welchCrossSpectrum(Float64Array.from(f.noise), Float64Array.from(f.csd.y), f.sampleRate, {
      segmentLength: f.csd.segmentLength,
      overlap: f.csd.overlap,
      detrend: 'none',
    });
    const peak = Math.max(...f.csd.re.map(Math.abs));
    // source: scipy.signal.csd(x, y, window='hann', nperseg=512, noverlap=256, detrend=False)
    expectAllClose(r.re, f.csd.re, 1e-10, 1e-12 * peak);
    expectAllClose(r.im, f.csd.im, 1e-10, 1e-12 * peak);
  });
});
