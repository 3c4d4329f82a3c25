import { describe, expect, it } from 'vitest';
import { Matrix, inverse } from 'ml-matrix';
import { inverseSpd, multiply, quadraticForm, sandwich } from '../../../kernel-lib/fit/inference/dense-ops';

// Each helper against the same product or inverse computed by ml-matrix 6 (general-purpose library).
const rowMajor = (m: Matrix) => Float64Array.from(m.to1DArray());
const a = new Matrix([[2, -1, 0.5], [0, 3, 1]]);
const b = new Matrix([[1, 4], [-2, 0.5], [3, 0]]);
const spd = new Matrix([[4, 1, 0.3], [1, 3, -0.5], [0.3, -0.5, 2]]);

describe('dense helpers of the inference methods', () => {
  it('multiply equals ml-matrix mmul, also into a dirty output buffer', () => {
    const out = new Float64Array(4).fill(99);
    expect(Array.from(multiply(rowMajor(a), rowMajor(b), 2, 3, 2, out))).toEqual(Array.from(rowMajor(a.mmul(b))));
  });

  it('inverseSpd equals ml-matrix inverse, and is null for a matrix that is not positive definite', () => {
    const inv = inverseSpd(rowMajor(spd), 3)!;
    const ref = rowMajor(inverse(spd));
    for (let k = 0; k < 9; k++) expect(inv[k]).toBeCloseTo(ref[k], 14);
    expect(inverseSpd([1, 2, 2, 1], 2)).toBeNull();
    expect(inverseSpd([], 0)).toHaveLength(0);
  });

  it('quadraticForm is cᵀAc and sandwich is L A Lᵀ', () => {
    const c = [0.5, -1, 2];
    const cm = Matrix.columnVector(c);
    expect(quadraticForm(rowMajor(spd), c, 3)).toBeCloseTo(cm.transpose().mmul(spd).mmul(cm).get(0, 0), 13);
    const s = sandwich(rowMajor(a), rowMajor(spd), 2, 3);
    const ref = rowMajor(a.mmul(spd).mmul(a.transpose()));
    for (let k = 0; k < 4; k++) expect(s[k]).toBeCloseTo(ref[k], 13);
    expect(s[1]).toBe(s[2]); // exactly symmetric
  });
});
