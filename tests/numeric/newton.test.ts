import { describe, expect, it } from 'vitest';
import { newtonMinimise } from '../../kernel-lib/numeric/newton';

/** Rosenbrock (1960), Computer Journal 3:175, with its gradient written out. */
function rosenbrock(x: Float64Array, g: Float64Array): number {
  const a = x[1] - x[0] * x[0];
  const b = 1 - x[0];
  g[0] = -400 * x[0] * a - 2 * b;
  g[1] = 200 * a;
  return 100 * a * a + b * b;
}

describe('newtonMinimise on textbook test functions', () => {
  for (const hessian of ['differences', 'bfgs'] as const) {
    it(`Rosenbrock (${hessian}): minimum 0 at (1, 1) from the classic start (−1.2, 1)`, () => {
      // start (−1.2, 1) as in Nocedal and Wright 2006, Numerical Optimization, §3.5 exercise 3.1
      const r = newtonMinimise(rosenbrock, [-1.2, 1], [-5, -5], [5, 5], { hessian, decrementTolerance: 1e-20 });
      expect(r.converged).toBe(true);
      expect(Math.abs(r.x[0] - 1)).toBeLessThan(1e-6);
      expect(Math.abs(r.x[1] - 1)).toBeLessThan(1e-6);
      expect(r.value).toBeLessThan(1e-14);
      // Newton's method needs a few dozen gradients here, far fewer than a simplex search
      expect(r.evaluations).toBeLessThan(200);
    });
  }

  it('a bound that cuts off the free minimum: the optimum sits exactly on the bound', () => {
    // (x − 2)² + (y + 1)² + xy over x ≤ 1, y ≥ 0: at (1, 0) the gradient (2, 3) points out of the box,
    // so (1, 0) is the constrained minimum, value 2 (Karush-Kuhn-Tucker conditions, common practice, no source)
    const f = (x: Float64Array, g: Float64Array) => {
      g[0] = 2 * (x[0] - 2) + x[1];
      g[1] = 2 * (x[1] + 1) + x[0];
      return (x[0] - 2) ** 2 + (x[1] + 1) ** 2 + x[0] * x[1];
    };
    const r = newtonMinimise(f, [0.5, 0.5], [-3, 0], [1, 3]);
    expect(r.converged).toBe(true);
    expect(r.x[0]).toBe(1);
    expect(r.x[1]).toBe(0);
    expect(r.value).toBeCloseTo(2, 12);
  });

  it('a quadratic is solved in one Newton step; an infinite start is reported, not thrown', () => {
    // f = ½ xᵀAx − bᵀx with A = [[4, 1], [1, 3]], b = (1, 2): minimum at A⁻¹b = (1/11, 7/11)
    const f = (x: Float64Array, g: Float64Array) => {
      g[0] = 4 * x[0] + x[1] - 1;
      g[1] = x[0] + 3 * x[1] - 2;
      return 0.5 * (4 * x[0] * x[0] + 2 * x[0] * x[1] + 3 * x[1] * x[1]) - x[0] - 2 * x[1];
    };
    const r = newtonMinimise(f, [5, -5], [-10, -10], [10, 10], { hessian: 'differences' });
    expect(Math.abs(r.x[0] - 1 / 11)).toBeLessThan(1e-9);
    expect(Math.abs(r.x[1] - 7 / 11)).toBeLessThan(1e-9);
    // start + 2 difference gradients, one step, then 2 more differences to confirm
    expect(r.evaluations).toBeLessThanOrEqual(6);
    const bad = newtonMinimise(() => Infinity, [0], [-1], [1]);
    expect(bad.converged).toBe(false);
    expect(bad.reason).toMatch(/not finite/);
  });
});
