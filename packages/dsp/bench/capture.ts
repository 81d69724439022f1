/** The benchmark's capture: 10 s, 48 kHz, stereo; a −3 dBFS tone with 2nd/3rd harmonics and noise. */
export const BENCH_SAMPLE_RATE = 48000;
export const BENCH_SECONDS = 10;

export function makeCapture(): { sampleRate: number; channels: Float64Array[] } {
  const fs = BENCH_SAMPLE_RATE;
  const n = fs * BENCH_SECONDS;
  const channels = [997, 1001.7].map((f, ch) => {
    const x = new Float64Array(n);
    let s = 12345 + ch;
    for (let i = 0; i < n; i++) {
      s = (s * 1103515245 + 12345) % 2147483648;
      const t = (2 * Math.PI * f * i) / fs;
      x[i] = 0.7 * Math.sin(t) + 7e-4 * Math.sin(2 * t + 0.3) + 2e-4 * Math.sin(3 * t + 1) + 3e-5 * (2 * (s / 2147483648) - 1);
    }
    return x;
  });
  return { sampleRate: fs, channels };
}
