import { describe, expect, it } from 'vitest';
import { coherence, minimumCoherence } from '../../src/transfer/coherence.js';
import { gaussian, sine } from '../helpers/signals.js';
import { hasPythonScipy, runPython } from '../io/python-oracle.js';
import { refusedBy } from '../helpers/refused.js';

const FS = 48000;
const N = 2 ** 18;

/** x: white Gaussian noise (σ = 1); y = (x[n] + x[n−1])/2 + independent white noise of σ = 0.3. */
function noisyPath(): { x: Float64Array; y: Float64Array } {
  const x = gaussian(N, 21);
  const noise = gaussian(N, 22, 0.3);
  const y = new Float64Array(N);
  for (let n = 0; n < N; n++) y[n] = 0.5 * ((x[n] as number) + (n > 0 ? (x[n - 1] as number) : 0)) + (noise[n] as number);
  return { x, y };
}

describe('coherence (H1 / Welch, Bendat & Piersol §9.2)', () => {
  it('equals SNR/(1 + SNR) per bin for a filter plus independent output noise', () => {
    const { x, y } = noisyPath();
    const result = coherence(x, y, FS, { segmentLength: 1024 });
    // Closed form: |H(f)|² = cos²(πf/fs) for h = [½, ½]; both inputs white, so the output SNR per
    // bin is |H|²·σx²/σn² = cos²(πf/fs)/0.09, and γ² = SNR/(1 + SNR) (Bendat & Piersol, §9.2.3).
    for (const f of [1000, 8000, 14000, 18000, 21000, 23000]) {
      const k0 = Math.round(f / result.binHz) - 8;
      let measured = 0;
      let expected = 0;
      for (let k = k0; k < k0 + 16; k++) {
        measured += result.gamma2[k] as number;
        const snr = Math.cos((Math.PI * k * result.binHz) / FS) ** 2 / 0.09;
        expected += snr / (1 + snr);
      }
      // 511 averaged segments: bias (1 − γ²)²/511 < 0.002, scatter of a 16-bin mean ≈ 0.005.
      expect(Math.abs(measured / 16 - expected / 16)).toBeLessThan(0.015);
    }
    expect(result.segments).toBe(511);
  });

  it.skipIf(!hasPythonScipy())('matches scipy.signal.coherence bin for bin', () => {
    const x = gaussian(8192, 31);
    const noise = gaussian(8192, 32, 0.5);
    const y = x.map((v, i) => 0.7 * v + (i > 2 ? 0.2 * (x[i - 3] as number) : 0) + (noise[i] as number));
    const ours = coherence(x, y, FS, { segmentLength: 512 });
    const diff = runPython(
      `from scipy.signal import coherence
f, c = coherence(IN["x"], IN["y"], fs=48000, window="hann", nperseg=512, noverlap=256, detrend=False)
print(json.dumps(float(np.max(np.abs(c - IN["ours"])))))`,
      { x, y, ours: ours.gamma2 },
    ) as number;
    expect(diff).toBeLessThan(1e-9);
  });

  it('a noiseless linear path has γ² = 1 wherever the reference has energy', () => {
    const { x } = noisyPath();
    const y = x.map((v) => -0.25 * v);
    const result = coherence(x, y, FS, { segmentLength: 2048 });
    const min = minimumCoherence(result, 20, 20000);
    expect(min?.gamma2).toBeGreaterThan(1 - 1e-9);
  });

  it('minimumCoherence looks only at bins where the reference carries energy', () => {
    // A multitone on exact bins of a 4096-point segment (k·fs/4096), plus −60 dBFS white noise in the capture.
    const seg = 4096;
    const tones = [50, 200, 700, 1500];
    const x = new Float64Array(N);
    for (const k of tones) {
      const s = sine(N, FS, (k * FS) / seg, 0.2);
      for (let i = 0; i < N; i++) x[i] = (x[i] as number) + (s[i] as number);
    }
    const noise = gaussian(N, 41, 10 ** (-60 / 20) / Math.SQRT2);
    const y = x.map((v, i) => 0.5 * v + (noise[i] as number));
    const result = coherence(x, y, FS, { segmentLength: seg });
    const min = minimumCoherence(result, 20, 20000);
    // At a tone's bin the capture holds 0.1²/2 = 5e−3 against noise of 5e−7 (AES17 RMS²) spread over
    // 24 kHz, 5e−7·11.72 Hz/24 kHz·1.5 (Hann ENBW, Harris 1978) = 3.7e−10 per bin: SNR ≈ 1e7 (−6 dB at
    // the neighbours), so γ² = SNR/(1 + SNR) > 0.99999 (closed form); 0.999 leaves room for the estimate.
    expect(min?.gamma2).toBeGreaterThan(0.999);
    // Each tone's bin and its two Hann neighbours (−6 dB) qualify: 3 bins per tone.
    expect(min?.bins).toBe(12);
    // Counting every bin would read the noise-only bins, where the stimulus explains nothing.
    const all = minimumCoherence(result, 20, 20000, Number.MIN_VALUE);
    expect(all?.gamma2).toBeLessThan(0.1);
    expect(minimumCoherence(result, 21000, 22000)).toBeNull();
  });

  it('checks its inputs', () => {
    expect(() => coherence(new Float64Array(100), new Float64Array(99), FS)).toThrow(refusedBy('coherence', /^reference and capture/));
    expect(() => coherence(new Float64Array(100), new Float64Array(100), -1)).toThrow(refusedBy('coherence', /^sampleRate/));
    const r = coherence(gaussian(4096, 1), gaussian(4096, 2), FS, { segmentLength: 256 });
    expect(() => minimumCoherence(r, 100, 10)).toThrow(refusedBy('minimumCoherence', /^lowHz/));
  });
});
