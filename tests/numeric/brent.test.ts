import { describe, expect, it } from 'vitest';
import { brentMinimise } from '../../kernel-lib/numeric/brent';

describe('brentMinimise on functions with known minima', () => {
  it('finds the minimum of a parabola and of x − log x', () => {
    // (x − 2)² + 1: minimum 1 at x = 2 (exact)
    const p = brentMinimise((x) => (x - 2) ** 2 + 1, -5, 7);
    expect(p.converged).toBe(true);
    expect(p.x).toBeCloseTo(2, 6);
    expect(p.value).toBeCloseTo(1, 12);
    // x − log x on (0, 5]: derivative 1 − 1/x vanishes at x = 1, minimum value 1 (calculus identity)
    const q = brentMinimise((x) => x - Math.log(x), 0.01, 5);
    expect(q.x).toBeCloseTo(1, 6);
    expect(q.value).toBeCloseTo(1, 12);
  });

  it('a minimum on the edge of the interval is reached at the edge', () => {
    // exp(x) is increasing: the minimum over [0.5, 3] is at 0.5 (common practice, no source)
    const r = brentMinimise((x) => Math.exp(x), 0.5, 3);
    expect(r.x).toBeCloseTo(0.5, 5);
  });
});
