/**
 * Small deterministic signal generators for the engine's own tests (independent of the
 * stimulus package, so a fault there cannot mask one here).
 */

/** Mulberry32 PRNG: uniform in [0, 1), deterministic per seed. */
export function uniformRng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal samples by Box–Muller. */
export function gaussian(length: number, seed: number, sigma = 1): Float64Array {
  const u = uniformRng(seed);
  const x = new Float64Array(length);
  for (let i = 0; i < length; i += 2) {
    const r = Math.sqrt(-2 * Math.log(1 - u()));
    const t = 2 * Math.PI * u();
    x[i] = sigma * r * Math.cos(t);
    if (i + 1 < length) x[i + 1] = sigma * r * Math.sin(t);
  }
  return x;
}

/** A·sin(2πft/fs + φ) + dc. */
export function sine(length: number, sampleRate: number, frequency: number, amplitude = 1, phase = 0, dc = 0): Float64Array {
  const x = new Float64Array(length);
  for (let n = 0; n < length; n++) x[n] = dc + amplitude * Math.sin((2 * Math.PI * frequency * n) / sampleRate + phase);
  return x;
}

/** Rounds to an N-bit signed grid (full scale ±1, step 2^{1−N}), as an ideal quantiser. */
export function quantise(x: Float64Array, bits: number): Float64Array {
  const scale = 2 ** (bits - 1);
  const out = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) out[i] = Math.round((x[i] as number) * scale) / scale;
  return out;
}
