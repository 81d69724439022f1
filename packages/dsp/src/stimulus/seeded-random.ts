import { EngineInputError } from '../util/engine-input-error.js';

/** A deterministic stream of pseudo-random numbers. */
export interface SeededRandom {
  /** Next raw 32-bit output as an unsigned integer. */
  nextUint32(): number;
  /** Uniform in [0, 1) with 53 random bits. */
  next(): number;
  /** Standard normal (mean 0, variance 1). */
  nextGaussian(): number;
}

const MASK64 = (1n << 64n) - 1n;

/**
 * SplitMix64 (G. L. Steele, D. Lea, C. H. Flood, "Fast splittable pseudorandom number
 * generators", OOPSLA 2014): used only to spread a seed over the generator's state, as the
 * xoshiro authors recommend. BigInt is fine here: it runs twice per generator.
 *
 * @throws RangeError when `count` is not a positive whole number.
 */
export function splitMix64(seed: bigint, count: number): bigint[] {
  if (!Number.isInteger(count) || count < 1) throw new EngineInputError('splitMix64', 'count must be a positive whole number');
  let x = seed & MASK64;
  const out: bigint[] = [];
  for (let i = 0; i < count; i++) {
    x = (x + 0x9e3779b97f4a7c15n) & MASK64;
    let z = x;
    z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK64;
    z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK64;
    out.push(z ^ (z >> 31n));
  }
  return out;
}

/**
 * A seeded xoshiro128** generator (D. Blackman, S. Vigna, "Scrambled linear pseudorandom
 * number generators", ACM TOMS 47(4), 2021): 32-bit state words, period 2^128 − 1, so it
 * runs on Math.imul without BigInt. The 128-bit state is two SplitMix64 outputs of the seed
 * (low word first). Uniforms take 53 bits from two outputs; Gaussians use the Box–Muller
 * transform (G. E. P. Box, M. E. Muller, Ann. Math. Statist. 29(2), 1958), caching the pair.
 *
 * @throws RangeError when the seed is not a whole number in 0 … 2^53 − 1.
 */
export function createSeededRandom(seed: number): SeededRandom {
  if (!Number.isSafeInteger(seed) || seed < 0) {
    throw new EngineInputError('createSeededRandom', `seed must be a whole number from 0 to 2^53 − 1, got ${seed}`);
  }
  const [a, b] = splitMix64(BigInt(seed), 2) as [bigint, bigint];
  let s0 = Number(a & 0xffffffffn) | 0;
  let s1 = Number(a >> 32n) | 0;
  let s2 = Number(b & 0xffffffffn) | 0;
  let s3 = Number(b >> 32n) | 0;
  let spare: number | undefined;

  const nextUint32 = (): number => {
    const m = Math.imul(s1, 5);
    const result = Math.imul((m << 7) | (m >>> 25), 9);
    const t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = (s3 << 11) | (s3 >>> 21);
    return result >>> 0;
  };
  const next = (): number => ((nextUint32() >>> 5) * 67108864 + (nextUint32() >>> 6)) / 9007199254740992;
  const nextGaussian = (): number => {
    if (spare !== undefined) {
      const g = spare;
      spare = undefined;
      return g;
    }
    const u1 = 1 - next(); // (0, 1]: log is finite
    const u2 = next();
    const r = Math.sqrt(-2 * Math.log(u1));
    spare = r * Math.sin(2 * Math.PI * u2);
    return r * Math.cos(2 * Math.PI * u2);
  };
  return { nextUint32, next, nextGaussian };
}
