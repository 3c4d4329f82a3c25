/**
 * Dense kernels on row-major Float64Array storage. Every routine works in place on
 * caller-owned buffers so that optimiser loops allocate nothing.
 */

/**
 * In-place Cholesky factorisation A = L Lᵀ of the leading n×n block of a row-major
 * symmetric matrix with row stride `stride` (only the lower triangle is read and written;
 * the strict upper triangle is left untouched). Golub and Van Loan, Matrix Computations,
 * 4th ed. 2013, Algorithm 4.2.1 (gaxpy Cholesky).
 * Returns -1 on success, or the index of the first non-positive pivot.
 */
export function choleskyInPlace(a: Float64Array, n: number, stride: number = n, offset = 0): number {
  for (let j = 0; j < n; j++) {
    const rj = offset + j * stride;
    let d = a[rj + j];
    for (let k = 0; k < j; k++) d -= a[rj + k] * a[rj + k];
    if (!(d > 0)) return j;
    const ljj = Math.sqrt(d);
    a[rj + j] = ljj;
    for (let i = j + 1; i < n; i++) {
      const ri = offset + i * stride;
      let s = a[ri + j];
      for (let k = 0; k < j; k++) s -= a[ri + k] * a[rj + k];
      a[ri + j] = s / ljj;
    }
  }
  return -1;
}

/** Solve L x = b in place (b overwritten by x); L lower triangular n×n row-major. */
export function forwardSolveInPlace(l: Float64Array, n: number, b: Float64Array, stride: number = n, lOffset = 0, bOffset = 0): void {
  for (let i = 0; i < n; i++) {
    const ri = lOffset + i * stride;
    let s = b[bOffset + i];
    for (let k = 0; k < i; k++) s -= l[ri + k] * b[bOffset + k];
    b[bOffset + i] = s / l[ri + i];
  }
}

/** Solve Lᵀ x = b in place (b overwritten by x); L lower triangular n×n row-major. */
export function backSolveTransposeInPlace(l: Float64Array, n: number, b: Float64Array, stride: number = n, lOffset = 0, bOffset = 0): void {
  for (let i = n - 1; i >= 0; i--) {
    let s = b[bOffset + i];
    for (let k = i + 1; k < n; k++) s -= l[lOffset + k * stride + i] * b[bOffset + k];
    b[bOffset + i] = s / l[lOffset + i * stride + i];
  }
}

/**
 * (L Lᵀ)⁻¹ from a lower Cholesky factor, written to `out` (n×n row-major, full symmetric).
 * Computes W = L⁻¹ column by column, then WᵀW. Allocates one n×n scratch unless given.
 */
export function inverseFromCholesky(l: Float64Array, n: number, out: Float64Array, scratch: Float64Array = new Float64Array(n * n)): void {
  const w = scratch;
  w.fill(0, 0, n * n);
  for (let j = 0; j < n; j++) {
    // column j of L⁻¹: solve L w = e_j (rows < j are zero)
    for (let i = j; i < n; i++) {
      let s = i === j ? 1 : 0;
      const ri = i * n;
      for (let k = j; k < i; k++) s -= l[ri + k] * w[k * n + j];
      w[ri + j] = s / l[ri + i];
    }
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let k = i; k < n; k++) s += w[k * n + i] * w[k * n + j];
      out[i * n + j] = s;
      out[j * n + i] = s;
    }
  }
}

/** Sum of log of the diagonal of an n×n lower factor (half the log-determinant of L Lᵀ). */
export function logDiagonalSum(l: Float64Array, n: number, stride: number = n, offset = 0): number {
  let s = 0;
  for (let i = 0; i < n; i++) s += Math.log(l[offset + i * stride + i]);
  return s;
}
