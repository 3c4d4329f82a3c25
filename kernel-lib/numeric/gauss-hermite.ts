/**
 * Gauss-Hermite quadrature nodes and weights for ∫ f(x) e^{−x²} dx, by Newton's method on the
 * orthonormal Hermite recurrence with the usual asymptotic starting values (Press et al.,
 * Numerical Recipes, 3rd ed. 2007, §4.6.1, routine gauher).
 */

export interface QuadratureRule {
  nodes: Float64Array;
  weights: Float64Array;
}

const cache = new Map<number, QuadratureRule>();

/** The n-point rule (n ≥ 1), nodes in increasing order; cached per n. */
export function gaussHermite(n: number): QuadratureRule {
  if (!Number.isInteger(n) || n < 1 || n > 200) throw new RangeError(`gaussHermite: n must be an integer from 1 to 200, got ${n}`);
  const hit = cache.get(n);
  if (hit) return hit;
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  const pim4 = Math.pow(Math.PI, -0.25);
  const half = Math.floor((n + 1) / 2);
  let z = 0;
  for (let i = 0; i < half; i++) {
    // starting guesses for the largest roots, then from the previous roots (Numerical Recipes §4.6.1)
    if (i === 0) z = Math.sqrt(2 * n + 1) - 1.85575 * Math.pow(2 * n + 1, -0.16667);
    else if (i === 1) z -= (1.14 * Math.pow(n, 0.426)) / z;
    else if (i === 2) z = 1.86 * z - 0.86 * x[0];
    else if (i === 3) z = 1.91 * z - 0.91 * x[1];
    else z = 2 * z - x[i - 2];
    let pp = 0;
    for (let it = 0; it < 100; it++) {
      let p1 = pim4;
      let p2 = 0;
      for (let j = 0; j < n; j++) {
        const p3 = p2;
        p2 = p1;
        p1 = z * Math.sqrt(2 / (j + 1)) * p2 - Math.sqrt(j / (j + 1)) * p3;
      }
      pp = Math.sqrt(2 * n) * p2;
      const z1 = z;
      z = z1 - p1 / pp;
      if (Math.abs(z - z1) <= 1e-15 * Math.max(1, Math.abs(z))) break;
    }
    x[i] = z;
    x[n - 1 - i] = -z;
    w[i] = 2 / (pp * pp);
    w[n - 1 - i] = w[i];
  }
  if (n % 2 === 1) x[half - 1] = 0; // the middle root is exactly zero
  x.reverse();
  w.reverse();
  const rule = { nodes: x, weights: w };
  cache.set(n, rule);
  return rule;
}
