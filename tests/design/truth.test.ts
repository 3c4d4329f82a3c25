import { describe, expect, it } from 'vitest';
import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import { semidefiniteCholesky } from '../../kernel-lib/design/truth';

/** L Lᵀ of a k×k row-major lower factor. */
function product(l: Float64Array, k: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) {
    let s = 0;
    for (let m = 0; m < k; m++) s += l[i * k + m] * l[j * k + m];
    out.push(s);
  }
  return out;
}

// Covariance of random intercept and slope built from SDs and a correlation:
// Σ = [[s1², ρ s1 s2], [ρ s1 s2, s2²]] (common practice, no source).
const cov = (s1: number, s2: number, rho: number) => Float64Array.from([s1 * s1, rho * s1 * s2, rho * s1 * s2, s2 * s2]);

describe('semidefiniteCholesky', () => {
  it('equals the ordinary Cholesky factor for a positive definite matrix (ml-matrix reference)', () => {
    const a = Float64Array.from([4, 2, 0.4, 2, 5, 1, 0.4, 1, 3]);
    const l = semidefiniteCholesky(a, 3)!;
    const ref = new CholeskyDecomposition(new Matrix([[4, 2, 0.4], [2, 5, 1], [0.4, 1, 3]])).lowerTriangularMatrix;
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(l[i * 3 + j]).toBeCloseTo(ref.get(i, j), 14);
  });

  it('factors a correlation of ±1 exactly, leaving a zero column (Higham 2002, §10.3)', () => {
    for (const rho of [1, -1]) {
      const a = cov(0.8, 0.3, rho);
      const l = semidefiniteCholesky(a, 2)!;
      expect(l).not.toBeNull();
      expect(l[3]).toBe(0);
      const back = product(l, 2);
      for (let k = 0; k < 4; k++) expect(back[k]).toBeCloseTo(a[k], 14);
    }
  });

  it('handles a zero variance (an SD of 0 in the truth) with a zero column', () => {
    // intercept SD 0, slope SD 0.5: the first pivot is zero and its column is left at zero
    const a = cov(0, 0.5, 0.3);
    const l = semidefiniteCholesky(a, 2)!;
    expect(Array.from(l)).toEqual([0, 0, 0, 0.5]);
  });

  it('returns null for a matrix that is not semidefinite', () => {
    // |ρ| > 1 gives a negative eigenvalue: 1 ± ρ for unit SDs
    expect(semidefiniteCholesky(cov(1, 1, 1.2), 2)).toBeNull();
    // zero variance with a non-zero covariance is impossible for a covariance matrix
    expect(semidefiniteCholesky(Float64Array.from([0, 0.5, 0.5, 1]), 2)).toBeNull();
    // 3×3 correlations 0.9, 0.9, −0.9: determinant 1 − 3·0.81 − 2·0.729 < 0 (by hand)
    expect(semidefiniteCholesky(Float64Array.from([1, 0.9, 0.9, 0.9, 1, -0.9, 0.9, -0.9, 1]), 3)).toBeNull();
  });
});
