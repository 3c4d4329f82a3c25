import { describe, expect, it } from 'vitest';
import { symmetricEigen } from '../../kernel-lib/numeric/symmetric-eigen';

describe('symmetricEigen', () => {
  it('a 2×2 matrix with known eigenvalues and vectors', () => {
    // [[2, 1], [1, 2]]: eigenvalues 3 and 1, vectors (1, 1)/√2 and (1, −1)/√2 (hand computation)
    const { values, vectors } = symmetricEigen([2, 1, 1, 2], 2);
    expect(values[0]).toBeCloseTo(3, 12);
    expect(values[1]).toBeCloseTo(1, 12);
    expect(Math.abs(vectors[0])).toBeCloseTo(Math.SQRT1_2, 12);
    expect(vectors[0] * vectors[1]).toBeGreaterThan(0);
    expect(vectors[2] * vectors[3]).toBeLessThan(0);
  });

  it('reconstructs a 4×4 matrix: A v = λ v, trace and orthonormal vectors', () => {
    // eigen-decomposition identities (Golub and Van Loan 2013, §8.1)
    const a = [4, 1, 0.5, 0, 1, 3, 0.2, 0.1, 0.5, 0.2, 2, 0.3, 0, 0.1, 0.3, 1];
    const n = 4;
    const { values, vectors } = symmetricEigen(a, n);
    for (let i = 0; i < n; i++) {
      for (let r = 0; r < n; r++) {
        let s = 0;
        for (let c = 0; c < n; c++) s += a[r * n + c] * vectors[i * n + c];
        expect(s).toBeCloseTo(values[i] * vectors[i * n + r], 10);
      }
      for (let j = 0; j < n; j++) {
        let dot = 0;
        for (let c = 0; c < n; c++) dot += vectors[i * n + c] * vectors[j * n + c];
        expect(dot).toBeCloseTo(i === j ? 1 : 0, 10);
      }
    }
    expect(values.reduce((s, v) => s + v, 0)).toBeCloseTo(10, 10);
    for (let i = 1; i < n; i++) expect(values[i]).toBeLessThanOrEqual(values[i - 1]);
  });
});
