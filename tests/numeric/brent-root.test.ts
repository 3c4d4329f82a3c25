import { describe, expect, it } from 'vitest';
import { brentRoot } from '../../kernel-lib/numeric/brent-root';

describe('brentRoot on equations with known roots', () => {
  it('√2, the Dottie number and a root at an end point', () => {
    // x² − 2 = 0 on [0, 2]: √2
    const a = brentRoot((x) => x * x - 2, 0, 2);
    expect(a.converged).toBe(true);
    expect(a.x).toBeCloseTo(Math.SQRT2, 12);
    // cos x = x: 0.7390851332151607 (the fixed point of cosine; scipy.optimize.brentq(lambda x: cos(x) - x, 0, 1))
    expect(brentRoot((x) => Math.cos(x) - x, 0, 1).x).toBeCloseTo(0.7390851332151607, 12);
    expect(brentRoot((x) => x - 3, 3, 5).x).toBe(3);
  });

  it('reports no root when the signs at the ends agree', () => {
    const r = brentRoot((x) => x * x + 1, -1, 1);
    expect(r.converged).toBe(false);
    expect(Number.isNaN(r.x)).toBe(true);
  });
});
