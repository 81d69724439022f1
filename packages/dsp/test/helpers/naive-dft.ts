/**
 * Direct O(N²) DFT, X[k] = Σ x[n]·e^{−2πikn/N}: the test oracle for the fast transforms
 * (definition of the DFT, Oppenheim & Schafer eq. 8.67). Angles are reduced mod N in integers
 * so that rounding stays at float64 level for every k·n.
 */
export function naiveDft(re: ArrayLike<number>, im: ArrayLike<number>): { re: Float64Array; im: Float64Array } {
  const n = re.length;
  const outRe = new Float64Array(n);
  const outIm = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    let sr = 0;
    let si = 0;
    for (let t = 0; t < n; t++) {
      const a = (-2 * Math.PI * ((k * t) % n)) / n;
      const c = Math.cos(a);
      const s = Math.sin(a);
      sr += (re[t] as number) * c - (im[t] as number) * s;
      si += (re[t] as number) * s + (im[t] as number) * c;
    }
    outRe[k] = sr;
    outIm[k] = si;
  }
  return { re: outRe, im: outIm };
}
