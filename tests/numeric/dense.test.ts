import { describe, expect, it } from 'vitest';
import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import {
  backSolveTransposeInPlace, choleskyInPlace, forwardSolveInPlace, inverseFromCholesky, logDiagonalSum,
} from '../../kernel-lib/numeric/dense';

// The 4×4 Hilbert matrix H_ij = 1/(i + j − 1) and its inverse, whose entries are integers given by
// the closed form (−1)^(i+j) (i+j−1) C(n+i−1, n−j) C(n+j−1, n−i) C(i+j−2, i−1)² (Choi 1983,
// "Tricks or treats with the Hilbert matrix", Amer. Math. Monthly 90(5)); det H_4 = 1/6048000 (same source).
const n = 4;
const hilbert = Float64Array.from({ length: n * n }, (_, k) => 1 / (Math.floor(k / n) + (k % n) + 1));
const hilbertInverse = [
  16, -120, 240, -140,
  -120, 1200, -2700, 1680,
  240, -2700, 6480, -4200,
  -140, 1680, -4200, 2800,
];

/** L Lᵀ of the lower triangle of an n×n row-major factor. */
function reconstruct(l: Float64Array, size: number, stride = size, offset = 0): number[] {
  const out: number[] = [];
  for (let i = 0; i < size; i++) {
    for (let j = 0; j < size; j++) {
      let s = 0;
      for (let k = 0; k <= Math.min(i, j); k++) s += l[offset + i * stride + k] * l[offset + j * stride + k];
      out.push(s);
    }
  }
  return out;
}

describe('choleskyInPlace', () => {
  it('factors a matrix with a known integer factor', () => {
    // A = L Lᵀ with L = [[2,0,0],[6,1,0],[−8,5,3]] (worked by hand: multiply out L Lᵀ; common practice, no source)
    const a = Float64Array.from([4, 12, -16, 12, 37, -43, -16, -43, 98]);
    expect(choleskyInPlace(a, 3)).toBe(-1);
    expect([a[0], a[3], a[4], a[6], a[7], a[8]]).toEqual([2, 6, 1, -8, 5, 3]);
    // strict upper triangle untouched (documented contract)
    expect([a[1], a[2], a[5]]).toEqual([12, -16, -43]);
  });

  it('reconstructs the Hilbert matrix and agrees with ml-matrix', () => {
    // identity L Lᵀ = A (Golub and Van Loan 2013, Theorem 4.2.7)
    const l = hilbert.slice();
    expect(choleskyInPlace(l, n)).toBe(-1);
    const back = reconstruct(l, n);
    for (let k = 0; k < n * n; k++) expect(back[k]).toBeCloseTo(hilbert[k], 14);
    // ml-matrix 6.x CholeskyDecomposition(A).lowerTriangularMatrix (general-purpose library)
    const ref = new CholeskyDecomposition(new Matrix(Array.from({ length: n }, (_, i) => Array.from(hilbert.slice(i * n, i * n + n))))).lowerTriangularMatrix;
    for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) expect(l[i * n + j]).toBeCloseTo(ref.get(i, j), 13);
  });

  it('works on a block inside a larger buffer (stride and offset)', () => {
    // The same 3×3 example placed at row 1, column 2 of a 5-wide buffer; other cells must not change.
    const stride = 5;
    const buf = new Float64Array(4 * stride).fill(7);
    const a = [4, 12, -16, 12, 37, -43, -16, -43, 98];
    const offset = stride + 2;
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) buf[offset + i * stride + j] = a[i * 3 + j];
    expect(choleskyInPlace(buf, 3, stride, offset)).toBe(-1);
    expect(buf[offset + 2 * stride + 1]).toBe(5); // L[2][1] of the integer factor above
    expect(buf[offset + 2 * stride + 2]).toBe(3);
    expect(buf[0]).toBe(7);
    expect(buf[stride + 1]).toBe(7);
    // half the log-determinant: log det A = 2 log(2·1·3) (product of the factor's diagonal)
    expect(logDiagonalSum(buf, 3, stride, offset)).toBeCloseTo(Math.log(6), 14);
  });

  it('reports the first non-positive pivot instead of producing NaN', () => {
    // [[1,2],[2,1]] is indefinite (eigenvalues 3 and −1): the second pivot is 1 − 4 < 0.
    expect(choleskyInPlace(Float64Array.from([1, 2, 2, 1]), 2)).toBe(1);
    // a zero or NaN first pivot is reported at 0
    expect(choleskyInPlace(Float64Array.from([0, 0, 0, 1]), 2)).toBe(0);
    expect(choleskyInPlace(Float64Array.from([NaN, 0, 0, 1]), 2)).toBe(0);
    // positive semidefinite but singular: [[1,1],[1,1]] has second pivot exactly 0
    expect(choleskyInPlace(Float64Array.from([1, 1, 1, 1]), 2)).toBe(1);
  });
});

describe('triangular solves and the inverse', () => {
  const l = hilbert.slice();
  choleskyInPlace(l, n);

  it('solves H x = b through L then Lᵀ (x = H⁻¹ b with the integer inverse)', () => {
    const b = [1, -2, 0.5, 3];
    const x = Float64Array.from(b);
    forwardSolveInPlace(l, n, x);
    backSolveTransposeInPlace(l, n, x);
    for (let i = 0; i < n; i++) {
      let expected = 0;
      for (let j = 0; j < n; j++) expected += hilbertInverse[i * n + j] * b[j];
      expect(x[i]).toBeCloseTo(expected, 8); // condition number of H_4 ≈ 1.55e4 (Choi 1983)
    }
  });

  it('solves inside larger buffers with offsets', () => {
    const b = Float64Array.from([9, 1, -2, 0.5, 3]);
    forwardSolveInPlace(l, n, b, n, 0, 1);
    // forward solve alone: L y = b, so L y must give b back (identity)
    const y = b.slice(1);
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let k = 0; k <= i; k++) s += l[i * n + k] * y[k];
      expect(s).toBeCloseTo([1, -2, 0.5, 3][i], 12);
    }
    expect(b[0]).toBe(9);
  });

  it('inverseFromCholesky gives the integer inverse of H_4 and is symmetric', () => {
    const inv = new Float64Array(n * n);
    inverseFromCholesky(l, n, inv);
    for (let k = 0; k < n * n; k++) expect(inv[k]).toBeCloseTo(hilbertInverse[k], 7);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) expect(inv[i * n + j]).toBe(inv[j * n + i]);
    // reusing a dirty scratch buffer gives the same result (it is cleared first)
    const again = new Float64Array(n * n);
    inverseFromCholesky(l, n, again, new Float64Array(n * n).fill(123));
    expect(Array.from(again)).toEqual(Array.from(inv));
  });

  it('logDiagonalSum is half the log-determinant', () => {
    // det H_4 = 1/6048000 (Choi 1983)
    expect(2 * logDiagonalSum(l, n)).toBeCloseTo(-Math.log(6048000), 10);
  });
});
