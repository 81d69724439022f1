import { describe, expect, it } from 'vitest';
import type { SweepSpec } from '@earmark/contracts';
import { generateStimulus, sweepFrequencyAt, sweepInverseFilter } from '../../src/stimulus/index.js';
import { hasPythonScipy, runPython } from '../io/python-oracle.js';

function sweep(partial: Partial<SweepSpec>): SweepSpec {
  return {
    kind: 'sweep', sampleRate: 48000, channels: 1, seconds: 0.5, levelDbfs: 0, from: 20, to: 2000,
    silenceSeconds: 0, fadeInSeconds: 0, fadeOutSeconds: 0, ...partial,
  };
}

/** Upward and downward zero crossings, linearly interpolated, in seconds. */
function zeroCrossings(x: Float64Array, fs: number): number[] {
  const out: number[] = [];
  for (let i = 1; i < x.length; i++) {
    const a = x[i - 1] as number;
    const b = x[i] as number;
    if ((a < 0 && b >= 0) || (a > 0 && b <= 0)) out.push((i - 1 + a / (a - b)) / fs);
  }
  return out;
}

describe('exponential sine sweep (Farina 2000)', () => {
  it('has the instantaneous frequency f1·e^{t·ln(f2/f1)/T} at its start and end (zero crossings)', () => {
    const spec = sweep({});
    const x = generateStimulus(spec).channels[0] ?? new Float64Array();
    expect(x.length).toBe(24000);
    const zc = zeroCrossings(x, spec.sampleRate);
    // Two crossings half a period apart: f ≈ 1/(2Δt) at their midpoint.
    const at = (i: number): { t: number; f: number } => {
      const a = zc[i] ?? NaN;
      const b = zc[i + 1] ?? NaN;
      return { t: (a + b) / 2, f: 1 / (2 * (b - a)) };
    };
    for (const i of [0, 1, 2, zc.length - 4, zc.length - 3, zc.length - 2]) {
      const { t, f } = at(i);
      const want = sweepFrequencyAt(t, spec.from, spec.to, spec.seconds);
      expect(Math.abs(f - want) / want).toBeLessThan(0.003);
    }
    // The checked crossings lie within the first and last tenth of the sweep.
    expect(at(0).t).toBeLessThan(0.1 * spec.seconds);
    expect(at(zc.length - 2).t).toBeGreaterThan(0.99 * spec.seconds);
  });

  it.skipIf(!hasPythonScipy())("equals scipy.signal.chirp(method='logarithmic', phi=-90) sample for sample", () => {
    // scipy's logarithmic chirp is cos(2π·f0·t1/ln(f1/f0)·((f1/f0)^(t/t1) − 1) + φ): with
    // φ = −90° it is Farina's sin(…) formula, an outside implementation of the same sweep.
    const spec = sweep({ sampleRate: 8000, from: 50, to: 3000, seconds: 0.5, levelDbfs: -6 });
    const x = generateStimulus(spec).channels[0] ?? new Float64Array();
    const r = runPython(
      `from scipy.signal import chirp
t = np.arange(4000) / 8000.0
ref = 10 ** (-6 / 20) * chirp(t, f0=50, t1=0.5, f1=3000, method="logarithmic", phi=-90)
print(json.dumps(float(np.max(np.abs(ref - IN["x"])))))`,
      { x },
    ) as number;
    expect(r).toBeLessThan(1e-9);
  });

  it('applies half-Hann fades and appends silence after the sweep', () => {
    const spec = sweep({ fadeInSeconds: 0.01, fadeOutSeconds: 0.02, silenceSeconds: 0.1, levelDbfs: -12 });
    const plain = generateStimulus({ ...spec, fadeInSeconds: 0, fadeOutSeconds: 0 }).channels[0] ?? new Float64Array();
    const x = generateStimulus(spec).channels[0] ?? new Float64Array();
    expect(x.length).toBe(24000 + 4800);
    expect(x[0]).toBe(0);
    // Fade-in gain ½(1 − cos(π·n/F)), F = 480 samples: n = 240 is the half-way point.
    expect(x[240]).toBeCloseTo((plain[240] ?? NaN) * 0.5, 12);
    expect(x[1000]).toBe(plain[1000]);
    expect(Math.abs(x[23999] ?? NaN)).toBe(0);
    expect(x.subarray(24000).every((v) => v === 0)).toBe(true);
    expect(Math.max(...plain.map(Math.abs))).toBeLessThanOrEqual(10 ** (-12 / 20));
    expect(Math.max(...plain.map(Math.abs))).toBeGreaterThan(10 ** (-12 / 20) * 0.9999);
  });
});

describe.skipIf(!hasPythonScipy())('sweepInverseFilter (Farina 2000), convolved by numpy', () => {
  const spec = sweep({ sampleRate: 16000, from: 100, to: 6000, seconds: 0.5, levelDbfs: -6, fadeInSeconds: 0.01, fadeOutSeconds: 0.005 });
  const N = 8000;
  const x = generateStimulus(spec).channels[0] ?? new Float64Array();
  const inv = sweepInverseFilter(spec);
  // One python run: linear response of the sweep itself, and of a distorted copy x + 0.5·x².
  const r = runPython(
    `x, inv = IN["x"], IN["inv"]
fs, f1, f2, N = 16000.0, 100.0, 6000.0, 8000
h = np.convolve(x, inv)
peak = int(np.argmax(np.abs(h)))
energy = float(np.sum(h ** 2))
near = float(np.sum(h[peak - 160: peak + 161] ** 2))
w = 2 * np.pi * np.sqrt(f1 * f2) / fs
gain_centre = float(np.abs(np.sum(h * np.exp(-1j * w * np.arange(len(h))))))
H = np.abs(np.fft.rfft(h, 1 << 15))
f = np.arange(len(H)) * fs / (1 << 15)
band = (f >= 2 * f1) & (f <= f2 / 2)
db = 20 * np.log10(H[band])
d = x + 0.5 * x ** 2
hd = np.convolve(d, inv)
expected_h2 = (N - 1) - 0.5 * fs * np.log(2) / np.log(f2 / f1)
early = np.abs(hd[: N - 1 - 200])
print(json.dumps(dict(peak=peak, len=len(h), concentration=near / energy, gain_centre=gain_centre,
    band_min=float(db.min()), band_max=float(db.max()), h2_peak=int(np.argmax(early)), h2_expected=float(expected_h2))))`,
    { x, inv },
  ) as Record<string, number>;

  it('has the sweep length, and sweep ⊛ inverse peaks at index N − 1', () => {
    expect(inv.length).toBe(N);
    expect(r.len).toBe(2 * N - 1);
    expect(r.peak).toBe(N - 1);
  });

  it('concentrates the energy of sweep ⊛ inverse around the peak (band-limited impulse)', () => {
    // ±160 samples = ±one period of f1; outside lies only the band edges' ringing.
    expect(r.concentration).toBeGreaterThan(0.98);
  });

  it('has unit gain at the band centre √(f1·f2) (the stated normalisation)', () => {
    expect(r.gain_centre).toBeCloseTo(1, 9);
  });

  it('is flat within ±1 dB from 2·f1 to f2/2 (the −6 dB/octave envelope undoes the pink sweep)', () => {
    // Without the envelope the response would tilt by 3 dB/octave: about 15 dB over this band.
    expect(r.band_min).toBeGreaterThan(-1);
    expect(r.band_max).toBeLessThan(1);
  });

  it('puts the 2nd-harmonic response T·ln2/ln(f2/f1) before the linear one', () => {
    expect(Math.abs((r.h2_peak ?? NaN) - (r.h2_expected ?? NaN))).toBeLessThanOrEqual(3);
  });
});

describe('sweepInverseFilter preconditions', () => {
  it('refuses a spec that is not a valid sweep', () => {
    expect(() => sweepInverseFilter(sweep({ from: 3000, to: 100 }))).toThrow(/from must be below to/);
    expect(() => sweepInverseFilter({ ...sweep({}), kind: 'sine' } as unknown as SweepSpec)).toThrow(/^Only a sweep has an inverse filter; this stimulus is a sine\.$/);
  });
});
