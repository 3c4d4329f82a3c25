/** Eigen-decomposition of a small symmetric matrix. */
export interface SymmetricEigen {
  /** Eigenvalues, in decreasing order. */
  values: Float64Array;
  /** Eigenvectors as rows: vectors[i * n + j] is component j of the eigenvector of values[i]. */
  vectors: Float64Array;
}

/**
 * Cyclic Jacobi rotations on a symmetric n×n row-major matrix (Golub and Van Loan, Matrix
 * Computations, 4th ed. 2013, §8.5, Jacobi methods). Meant for the handful of contrasts of a
 * multi-degree-of-freedom test, where n is small; the input is not modified.
 */
export function symmetricEigen(a: ArrayLike<number>, n: number): SymmetricEigen {
  const m = Float64Array.from({ length: n * n }, (_, i) => a[i]);
  const v = new Float64Array(n * n);
  for (let i = 0; i < n; i++) v[i * n + i] = 1;
  let scale = 0;
  for (let i = 0; i < n * n; i++) scale += m[i] * m[i];
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0;
    for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) off += m[i * n + j] * m[i * n + j];
    if (off <= 1e-32 * scale) break;
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = m[p * n + q];
        if (apq === 0) continue;
        // the symmetric Schur rotation that zeroes m[p][q]
        const tau = (m[q * n + q] - m[p * n + p]) / (2 * apq);
        const t = (tau >= 0 ? 1 : -1) / (Math.abs(tau) + Math.sqrt(1 + tau * tau));
        const c = 1 / Math.sqrt(1 + t * t);
        const s = t * c;
        for (let k = 0; k < n; k++) {
          const mkp = m[k * n + p];
          const mkq = m[k * n + q];
          m[k * n + p] = c * mkp - s * mkq;
          m[k * n + q] = s * mkp + c * mkq;
        }
        for (let k = 0; k < n; k++) {
          const mpk = m[p * n + k];
          const mqk = m[q * n + k];
          m[p * n + k] = c * mpk - s * mqk;
          m[q * n + k] = s * mpk + c * mqk;
        }
        for (let k = 0; k < n; k++) {
          const vkp = v[k * n + p];
          const vkq = v[k * n + q];
          v[k * n + p] = c * vkp - s * vkq;
          v[k * n + q] = s * vkp + c * vkq;
        }
      }
    }
  }
  const order = Array.from({ length: n }, (_, i) => i).sort((x, y) => m[y * n + y] - m[x * n + x]);
  const values = new Float64Array(n);
  const vectors = new Float64Array(n * n);
  order.forEach((col, i) => {
    values[i] = m[col * n + col];
    for (let j = 0; j < n; j++) vectors[i * n + j] = v[j * n + col];
  });
  return { values, vectors };
}
