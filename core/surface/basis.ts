import type { AxisBasis } from './axis';

/**
 * The tensor-product basis of a surface: the row-wise product of the two inputs' bases
 * (docs/design.md, "Surfaces"). Basis function (a, b) is B_a(u) B_b(v), stored at index
 * a * sizeV + b; the natural boundary conditions of each input enter through the Kronecker
 * product of the two null-space maps, Z = Zu ⊗ Zv, so the fit has dfU x dfV free
 * coefficients and the span holds the constant (the intercept is in the span, not added).
 * Each row has at most 4 x 4 nonzero products, at increasing indices.
 */
export class SurfaceBasis {
  /** Number of tensor basis functions, sizeU x sizeV. */
  readonly size: number;
  /** Nonzero products per row, widthU x widthV (16 for two splines). */
  readonly width: number;
  /** Free coefficients, dfU x dfV: the surface's df. */
  readonly df: number;
  /** Zu ⊗ Zv, size x df row-major: column j * dfV + k is column j of Zu times column k of Zv. */
  readonly z: Float64Array;
  private readonly bufU: Float64Array;
  private readonly bufV: Float64Array;

  constructor(
    readonly axisU: AxisBasis,
    readonly axisV: AxisBasis,
  ) {
    this.size = axisU.size * axisV.size;
    this.width = axisU.width * axisV.width;
    this.df = axisU.df * axisV.df;
    this.z = kronecker(axisU.z, axisU.size, axisU.df, axisV.z, axisV.size, axisV.df);
    this.bufU = new Float64Array(axisU.width);
    this.bufV = new Float64Array(axisV.width);
  }

  /**
   * The nonzero products at (u, v): their indices into idx and values into val (width each,
   * indices increasing). Linear beyond the boundary knots in each input. O(width).
   */
  row(u: number, v: number, idx: Int32Array, val: Float64Array): void {
    const { axisU, axisV, bufU, bufV } = this;
    const fu = axisU.row(u, bufU);
    const fv = axisV.row(v, bufV);
    const pv = axisV.size;
    const wu = axisU.width;
    const wv = axisV.width;
    let k = 0;
    for (let a = 0; a < wu; a++) {
      const ba = bufU[a] as number;
      const base = (fu + a) * pv + fv;
      for (let b = 0; b < wv; b++, k++) {
        idx[k] = base + b;
        val[k] = ba * (bufV[b] as number);
      }
    }
  }

  /** The input ranges where basis function k = a * sizeV + b is nonzero, for messages. */
  supportOf(k: number): { readonly u: readonly [number, number]; readonly v: readonly [number, number] } {
    const pv = this.axisV.size;
    return { u: this.axisU.supportOf(Math.floor(k / pv)), v: this.axisV.supportOf(k % pv) };
  }
}

/**
 * Kronecker product of A (ra x ca) and B (rb x cb), both row-major: entry (i * rb + k,
 * j * cb + l) = A[i, j] B[k, l]. O(ra ca rb cb).
 * Example: kronecker([1, 2], 1, 2, [1, 1], 2, 1) -> [1, 2, 1, 2] (2 x 2).
 */
export function kronecker(a: Float64Array, ra: number, ca: number, b: Float64Array, rb: number, cb: number): Float64Array {
  const cols = ca * cb;
  const out = new Float64Array(ra * rb * cols);
  for (let i = 0; i < ra; i++)
    for (let j = 0; j < ca; j++) {
      const aij = a[i * ca + j] as number;
      if (aij === 0) continue;
      for (let k = 0; k < rb; k++) for (let l = 0; l < cb; l++) out[(i * rb + k) * cols + j * cb + l] = aij * (b[k * cb + l] as number);
    }
  return out;
}
