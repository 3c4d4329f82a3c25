import { describe, expect, it } from 'vitest';
import { gaussHermite } from '../../kernel-lib/numeric/gauss-hermite';

describe('gaussHermite', () => {
  it('reproduces numpy.polynomial.hermite.hermgauss(9) (numpy 1.24.2)', () => {
    const { nodes, weights } = gaussHermite(9);
    // numpy.polynomial.hermite.hermgauss(9), first three nodes and weights
    const refNodes = [-3.1909932017815277, -2.266580584531843, -1.468553289216668];
    const refWeights = [3.9606977263264365e-05, 0.004943624275536941, 0.08847452739437664];
    for (let i = 0; i < 3; i++) {
      expect(Math.abs(nodes[i] - refNodes[i])).toBeLessThan(1e-13);
      expect(Math.abs(weights[i] - refWeights[i]) / refWeights[i]).toBeLessThan(1e-12);
    }
    expect(nodes[4]).toBe(0);
  });

  it('integrates x^(2j) e^(-x²) exactly up to degree 2n − 1', () => {
    // ∫ x^(2j) e^(-x²) dx = Γ(j + ½) (textbook identity; Abramowitz and Stegun 1964, 6.1.12 for Γ(j + ½))
    for (const n of [1, 2, 5, 9, 20, 40]) {
      const { nodes, weights } = gaussHermite(n);
      let gammaHalf = Math.sqrt(Math.PI);
      for (let j = 0; 2 * j <= 2 * n - 1; j++) {
        let s = 0;
        for (let i = 0; i < n; i++) s += weights[i] * nodes[i] ** (2 * j);
        expect(Math.abs(s - gammaHalf) / gammaHalf).toBeLessThan(1e-11);
        gammaHalf *= j + 0.5;
      }
    }
  });

  it('rejects a bad node count', () => {
    expect(() => gaussHermite(0)).toThrow(RangeError);
  });
});
