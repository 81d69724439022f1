import { precondition } from '../util/preconditions.js';

/**
 * Start of the `length`-sample stretch of x[from…to) with the most energy, to a resolution of
 * length/8 samples (block energies, then a running sum): O(N).
 * @throws RangeError on a bad span or length
 * @see common practice (energy-based segment selection)
 */
export function loudestStretch(x: Float64Array, length: number, from = 0, to = x.length): number {
  precondition(Number.isInteger(from) && Number.isInteger(to) && from >= 0 && to <= x.length && from <= to, 'loudestStretch', `span ${from}…${to} lies outside 0…${x.length}`);
  precondition(Number.isInteger(length) && length >= 1, 'loudestStretch', `length must be a whole number ≥ 1 (got ${length})`);
  if (length >= to - from) return from;
  const block = Math.max(1, Math.floor(length / 8));
  const blocks = Math.floor((to - from) / block);
  const energy = new Float64Array(blocks);
  for (let b = 0; b < blocks; b++) {
    let e = 0;
    for (let i = from + b * block; i < from + (b + 1) * block; i++) e += (x[i] as number) ** 2;
    energy[b] = e;
  }
  const per = Math.max(1, Math.floor(length / block));
  let best = -1;
  let bestStart = from;
  let sum = 0;
  for (let b = 0; b < blocks; b++) {
    sum += energy[b] as number;
    if (b >= per) sum -= energy[b - per] as number;
    if (b >= per - 1 && sum > best) {
      best = sum;
      bestStart = from + (b - per + 1) * block;
    }
  }
  return Math.min(bestStart, to - length);
}
