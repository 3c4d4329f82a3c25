import { describe, expect, it } from 'vitest';
import { nelderMeadBounded } from '../../kernel-lib/numeric/nelder-mead';

describe('nelderMeadBounded on textbook test functions', () => {
  it('Rosenbrock: minimum 0 at (1, 1) from the classic start (−1.2, 1)', () => {
    // Rosenbrock (1960), Computer Journal 3:175; start (−1.2, 1) as in Nelder and Mead (1965)
    const rosen = (x: Float64Array) => 100 * (x[1] - x[0] * x[0]) ** 2 + (1 - x[0]) ** 2;
    const r = nelderMeadBounded(rosen, [-1.2, 1], [-5, -5], [5, 5], { maxEvaluations: 5000, fTolerance: 1e-14, xTolerance: 1e-9 });
    expect(r.converged).toBe(true);
    expect(r.x[0]).toBeCloseTo(1, 3);
    expect(r.x[1]).toBeCloseTo(1, 3);
    expect(r.value).toBeLessThan(1e-8);
  });

  it('a bound that cuts off the free minimum: the optimum sits exactly on the bound', () => {
    // (x − 2)² + (y + 1)² over x ≤ 1, y ≥ 0: minimum at (1, 0), value 2 (projection onto the box)
    const f = (x: Float64Array) => (x[0] - 2) ** 2 + (x[1] + 1) ** 2;
    const r = nelderMeadBounded(f, [0.5, 0.5], [-3, 0], [1, 3]);
    expect(r.x[0]).toBeCloseTo(1, 4);
    expect(r.x[1]).toBeCloseTo(0, 4);
    expect(r.value).toBeCloseTo(2, 6);
  });
});
