/**
 * Solves the dense system A·x = b (A row-major n×n) by Gaussian elimination with partial
 * pivoting; A and b are overwritten. Returns null when A is singular to working precision.
 * Used only for the small normal-equation systems of the sine fits (n ≤ 21).
 * @see G. H. Golub, C. F. Van Loan, "Matrix Computations", 4th ed., §3.4 (partial pivoting)
 */
export function solveLinearSystem(a: Float64Array, b: Float64Array, n: number): Float64Array | null {
  let scale = 0;
  for (let i = 0; i < n * n; i++) scale = Math.max(scale, Math.abs(a[i] as number));
  if (scale === 0) return null;
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(a[r * n + col] as number) > Math.abs(a[pivot * n + col] as number)) pivot = r;
    const p = a[pivot * n + col] as number;
    if (Math.abs(p) <= scale * 1e-14) return null;
    if (pivot !== col) {
      for (let c = 0; c < n; c++) {
        const t = a[col * n + c] as number;
        a[col * n + c] = a[pivot * n + c] as number;
        a[pivot * n + c] = t;
      }
      const t = b[col] as number;
      b[col] = b[pivot] as number;
      b[pivot] = t;
    }
    for (let r = col + 1; r < n; r++) {
      const f = (a[r * n + col] as number) / p;
      if (f === 0) continue;
      for (let c = col; c < n; c++) a[r * n + c] = (a[r * n + c] as number) - f * (a[col * n + c] as number);
      b[r] = (b[r] as number) - f * (b[col] as number);
    }
  }
  const x = new Float64Array(n);
  for (let r = n - 1; r >= 0; r--) {
    let s = b[r] as number;
    for (let c = r + 1; c < n; c++) s -= (a[r * n + c] as number) * (x[c] as number);
    x[r] = s / (a[r * n + r] as number);
  }
  return x;
}
