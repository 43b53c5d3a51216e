import { FitError } from '../errors';
import { congruence, times, transposeTimes } from '../fit/linearFit';
import { factorSpd } from '../linalg/spd';
// The cubic of each active B-spline in a cell, from its values at TAU, as for curves.
import { TAU, VANDER_INV } from '../fit/powerSums/splineSums';
import type { AxisBasis } from './axis';
import type { SurfaceBasis } from './basis';
import { SURFACE_SUMS_PER_CELL, Y_OFFSET, YY_OFFSET } from './cells';

/** One input's basis in the cells of the union grid: per cell, its first active function and their cubics. */
interface AxisCubics {
  readonly width: number;
  readonly first: Int32Array;
  /** poly[c * 16 + a * 4 + p]: coefficient of t^p of active function a in cell c. */
  readonly poly: Float64Array;
  /** pair[c * 112 + (a * 4 + b) * 7 + P]: sum over p + q = P of poly_a,p poly_b,q (the product of two active functions). */
  readonly pair: Float64Array;
}

function axisCubics(axis: AxisBasis, breaks: Float64Array): AxisCubics {
  const cells = breaks.length - 1;
  const width = axis.width;
  const first = new Int32Array(cells);
  const poly = new Float64Array(cells * 16);
  const pair = new Float64Array(cells * 112);
  const buf = new Float64Array(4);
  const vals = new Float64Array(16);
  for (let c = 0; c < cells; c++) {
    const start = breaks[c] as number;
    const span = (breaks[c + 1] as number) - start;
    for (let m = 0; m < 4; m++) {
      first[c] = axis.row(start + span * (TAU[m] as number), buf);
      for (let a = 0; a < width; a++) vals[m * 4 + a] = buf[a] as number;
    }
    for (let a = 0; a < width; a++)
      for (let p = 0; p < 4; p++) {
        let s = 0;
        for (let m = 0; m < 4; m++) s += (VANDER_INV[p * 4 + m] as number) * (vals[m * 4 + a] as number);
        poly[c * 16 + a * 4 + p] = s;
      }
    for (let a = 0; a < width; a++)
      for (let b = 0; b < width; b++)
        for (let p = 0; p < 4; p++)
          for (let q = 0; q < 4; q++) {
            const k = c * 112 + (a * 4 + b) * 7 + p + q;
            pair[k] = (pair[k] as number) + (poly[c * 16 + a * 4 + p] as number) * (poly[c * 16 + b * 4 + q] as number);
          }
  }
  return { width, first, poly, pair };
}

/**
 * One surface candidate prepared for fitting from per-cell sums over its own cells (the
 * products of consecutive knots of each input; the union grid's sums are moved there by
 * projectU and projectV, core/surface/cells.ts), docs/design.md, "Surfaces": the Gram matrix of its tensor B-splines and the right-hand
 * side assembled cell by cell from the sums (the product of two active functions of each
 * input is a polynomial of degree 6 in its position), restricted by Zu ⊗ Zv and solved by
 * Cholesky with the condition check; the fitted surface is one bicubic per cell, whose
 * squared error over any set of summed rows follows from the sums too. Cost per fit
 * O(cells x 16^2 x 7 + p^2 q), independent of the number of rows.
 */
export class SurfaceFromSums {
  private readonly cu: AxisCubics;
  private readonly cv: AxisCubics;
  private readonly nu: number;
  private readonly nv: number;
  private readonly g: Float64Array;
  private readonly rhs: Float64Array;
  private readonly tmp = new Float64Array(16 * 7);
  private readonly yv = new Float64Array(16);
  /** The bicubic of the last fit in each cell: fitPoly[c * 16 + p * 4 + q], coefficient of t^p s^q. */
  readonly fitPoly: Float64Array;
  /** Centred coefficients of the last successful fit (tensor B-spline index a * sizeV + b). */
  theta: Float64Array = new Float64Array(0);
  /** Why the last fit failed. */
  lastError = '';

  constructor(
    breaksU: Float64Array,
    breaksV: Float64Array,
    readonly basis: SurfaceBasis,
    private readonly label: string,
  ) {
    this.cu = axisCubics(basis.axisU, breaksU);
    this.cv = axisCubics(basis.axisV, breaksV);
    this.nu = breaksU.length - 1;
    this.nv = breaksV.length - 1;
    this.g = new Float64Array(basis.size * basis.size);
    this.rhs = new Float64Array(basis.size);
    this.fitPoly = new Float64Array(this.nu * this.nv * 16);
  }

  /**
   * Weighted least-squares fit from the sums; fills theta and fitPoly. Returns false (with
   * lastError) when the summed rows cannot determine the coefficients. `checkOnly` asks the
   * condition check for its cheap bound first (the resampling hot path).
   */
  fit(sums: Float64Array, checkOnly = true): boolean {
    const { g, rhs, cu, cv, tmp, yv, nu, nv } = this;
    const P = this.basis.size;
    const pv = this.basis.axisV.size;
    const wu = cu.width;
    const wv = cv.width;
    g.fill(0);
    rhs.fill(0);
    for (let iu = 0; iu < nu; iu++) {
      const fu = cu.first[iu] as number;
      const pu0 = iu * 112;
      const qu0 = iu * 16;
      for (let iv = 0; iv < nv; iv++) {
        const o = (iu * nv + iv) * SURFACE_SUMS_PER_CELL;
        if ((sums[o] as number) === 0) continue; // no weight in this cell
        const fv = cv.first[iv] as number;
        const pv0 = iv * 112;
        const qv0 = iv * 16;
        // tmp[(b * 4 + b') * 7 + P] = sum_Q pairV[b, b', Q] S[P, Q].
        for (let b = 0; b < wv; b++)
          for (let b2 = 0; b2 <= b; b2++) {
            const pk = pv0 + (b * 4 + b2) * 7;
            const tk = (b * 4 + b2) * 7;
            for (let pp = 0; pp < 7; pp++) {
              const so = o + pp * 7;
              let acc = 0;
              for (let qq = 0; qq < 7; qq++) acc += (cv.pair[pk + qq] as number) * (sums[so + qq] as number);
              tmp[tk + pp] = acc;
              tmp[(b2 * 4 + b) * 7 + pp] = acc;
            }
          }
        // yv[b * 4 + p] = sum_q polyV[b, q] Y[p, q].
        for (let b = 0; b < wv; b++)
          for (let p = 0; p < 4; p++) {
            const yo = o + Y_OFFSET + p * 4;
            const po = qv0 + b * 4;
            yv[b * 4 + p] =
              (cv.poly[po] as number) * (sums[yo] as number) +
              (cv.poly[po + 1] as number) * (sums[yo + 1] as number) +
              (cv.poly[po + 2] as number) * (sums[yo + 2] as number) +
              (cv.poly[po + 3] as number) * (sums[yo + 3] as number);
          }
        for (let a = 0; a < wu; a++) {
          const ua = qu0 + a * 4;
          for (let b = 0; b < wv; b++) {
            const r = (fu + a) * pv + fv + b;
            rhs[r] =
              (rhs[r] as number) +
              (cu.poly[ua] as number) * (yv[b * 4] as number) +
              (cu.poly[ua + 1] as number) * (yv[b * 4 + 1] as number) +
              (cu.poly[ua + 2] as number) * (yv[b * 4 + 2] as number) +
              (cu.poly[ua + 3] as number) * (yv[b * 4 + 3] as number);
            const row = r * P;
            // Lower triangle: (a2, b2) at or before (a, b) in index order.
            for (let a2 = 0; a2 <= a; a2++) {
              const pk = pu0 + (a * 4 + a2) * 7;
              const bEnd = a2 === a ? b : wv - 1;
              const colBase = (fu + a2) * pv + fv;
              for (let b2 = 0; b2 <= bEnd; b2++) {
                const tk = (b * 4 + b2) * 7;
                let acc = 0;
                for (let pp = 0; pp < 7; pp++) acc += (cu.pair[pk + pp] as number) * (tmp[tk + pp] as number);
                g[row + colBase + b2] = (g[row + colBase + b2] as number) + acc;
              }
            }
          }
        }
      }
    }
    for (let i = 0; i < P; i++) for (let j = 0; j < i; j++) g[j * P + i] = g[i * P + j] as number;
    const z = this.basis.z;
    const Q = this.basis.df;
    try {
      const factor = factorSpd(congruence(g, z, P, Q), Q, this.label, undefined, checkOnly);
      this.theta = times(z, factor.solve(transposeTimes(z, rhs, P, Q)), P, Q);
    } catch (e) {
      if (e instanceof FitError) {
        this.lastError = e.message;
        return false;
      }
      throw e;
    }
    this.fillPolys();
    return true;
  }

  /** The bicubic of the fit in each cell, from theta. */
  private fillPolys(): void {
    const { cu, cv, nu, nv, theta, fitPoly } = this;
    const pv = this.basis.axisV.size;
    const h = this.yv; // scratch: h[a * 4 + q] = sum_b theta[a, b] polyV[b, q]
    fitPoly.fill(0);
    for (let iu = 0; iu < nu; iu++) {
      const fu = cu.first[iu] as number;
      for (let iv = 0; iv < nv; iv++) {
        const fv = cv.first[iv] as number;
        h.fill(0);
        for (let a = 0; a < cu.width; a++)
          for (let b = 0; b < cv.width; b++) {
            const th = theta[(fu + a) * pv + fv + b] as number;
            const po = iv * 16 + b * 4;
            for (let q = 0; q < 4; q++) h[a * 4 + q] = (h[a * 4 + q] as number) + th * (cv.poly[po + q] as number);
          }
        const fo = (iu * nv + iv) * 16;
        for (let a = 0; a < cu.width; a++)
          for (let p = 0; p < 4; p++) {
            const c = cu.poly[iu * 16 + a * 4 + p] as number;
            for (let q = 0; q < 4; q++) fitPoly[fo + p * 4 + q] = (fitPoly[fo + p * 4 + q] as number) + c * (h[a * 4 + q] as number);
          }
      }
    }
  }

  /**
   * Weighted sum of squared errors of the last fit over the rows summarised in `sums`:
   * sum w y^2 - 2 sum F_pq Y_pq + sum F_pq F_p'q' S_(p+p', q+q') per cell (docs/design.md,
   * "Power sums", step 5, in two dimensions).
   */
  sse(sums: Float64Array): number {
    const fp = this.fitPoly;
    const cells = this.nu * this.nv;
    let total = 0;
    for (let c = 0; c < cells; c++) {
      const o = c * SURFACE_SUMS_PER_CELL;
      if ((sums[o] as number) === 0) continue;
      const fo = c * 16;
      let cross = 0;
      for (let k = 0; k < 16; k++) cross += (fp[fo + k] as number) * (sums[o + Y_OFFSET + k] as number);
      let square = 0;
      for (let p = 0; p < 4; p++)
        for (let q = 0; q < 4; q++) {
          const f = fp[fo + p * 4 + q] as number;
          if (f === 0) continue;
          let acc = 0;
          for (let p2 = 0; p2 < 4; p2++) {
            const so = o + (p + p2) * 7 + q;
            const f2 = fo + p2 * 4;
            acc +=
              (fp[f2] as number) * (sums[so] as number) +
              (fp[f2 + 1] as number) * (sums[so + 1] as number) +
              (fp[f2 + 2] as number) * (sums[so + 2] as number) +
              (fp[f2 + 3] as number) * (sums[so + 3] as number);
          }
          square += f * acc;
        }
      total += (sums[o + YY_OFFSET] as number) - 2 * cross + square;
    }
    return total > 0 ? total : 0;
  }

  /** Value of the last fit at a row in cell c with positions t and s (its bicubic, by Horner). */
  valueAt(c: number, t: number, s: number): number {
    const fp = this.fitPoly;
    const o = c * 16;
    let f = 0;
    for (let p = 3; p >= 0; p--) {
      const k = o + p * 4;
      f = f * t + ((fp[k] as number) + s * ((fp[k + 1] as number) + s * ((fp[k + 2] as number) + s * (fp[k + 3] as number))));
    }
    return f;
  }
}
