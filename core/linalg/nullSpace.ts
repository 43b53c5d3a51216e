/**
 * Orthonormal basis of the null space of a full-row-rank r x p matrix C (row-major),
 * from the Householder QR factorisation of C' (Golub & Van Loan, Matrix Computations,
 * 4th ed., section 5.2): the last p - r columns of Q. This is how the natural-spline
 * boundary conditions are imposed on a B-spline basis. Returns Z as p x (p - r), row-major.
 * Cost O(p^2 r). Example: nullSpace(Float64Array.of(1, 1), 1, 2) spans (1, -1) / sqrt(2).
 */
export function nullSpace(c: Float64Array, r: number, p: number): Float64Array {
  // a = C' (p x r), overwritten by the Householder vectors.
  const a = new Float64Array(p * r);
  for (let i = 0; i < r; i++) for (let j = 0; j < p; j++) a[j * r + i] = c[i * p + j] as number;
  const vs: Float64Array[] = [];
  for (let k = 0; k < r; k++) {
    const v = new Float64Array(p);
    let norm = 0;
    for (let i = k; i < p; i++) norm += (a[i * r + k] as number) ** 2;
    norm = Math.sqrt(norm);
    if (!(norm > 0)) throw new Error('nullSpace: constraint matrix is rank deficient');
    const akk = a[k * r + k] as number;
    const alpha = akk > 0 ? -norm : norm;
    for (let i = k; i < p; i++) v[i] = a[i * r + k] as number;
    v[k] = akk - alpha;
    let vnorm = 0;
    for (let i = k; i < p; i++) vnorm += (v[i] as number) ** 2;
    for (let j = k; j < r; j++) {
      let s = 0;
      for (let i = k; i < p; i++) s += (v[i] as number) * (a[i * r + j] as number);
      const f = (2 * s) / vnorm;
      for (let i = k; i < p; i++) a[i * r + j] = (a[i * r + j] as number) - f * (v[i] as number);
    }
    vs.push(v.map((x) => x / Math.sqrt(vnorm)));
  }
  const q = p - r;
  const z = new Float64Array(p * q);
  const e = new Float64Array(p);
  for (let col = 0; col < q; col++) {
    e.fill(0);
    e[r + col] = 1;
    // Q e = H_1 H_2 ... H_r e: apply the reflections from the last to the first.
    for (let k = r - 1; k >= 0; k--) {
      const v = vs[k] as Float64Array;
      let s = 0;
      for (let i = k; i < p; i++) s += (v[i] as number) * (e[i] as number);
      for (let i = k; i < p; i++) e[i] = (e[i] as number) - 2 * s * (v[i] as number);
    }
    for (let i = 0; i < p; i++) z[i * q + col] = e[i] as number;
  }
  return z;
}
