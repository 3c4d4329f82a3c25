/** Result of a one-dimensional minimisation. */
export interface MinimiseResult1D {
  x: number;
  value: number;
  evaluations: number;
  converged: boolean;
  reason: string;
}

const GOLDEN = 0.3819660112501051; // (3 - sqrt(5)) / 2

/**
 * Minimise f on [a, b] without derivatives: golden-section search with parabolic
 * interpolation. Brent, Algorithms for Minimization without Derivatives (1973), ch. 5,
 * procedure "localmin".
 */
export function brentMinimise(
  f: (x: number) => number,
  a: number,
  b: number,
  options: { tolerance?: number; maxEvaluations?: number } = {},
): MinimiseResult1D {
  const tol = options.tolerance ?? 1e-10;
  const maxEval = options.maxEvaluations ?? 500;
  const eps = 1.4901161193847656e-8; // sqrt(machine epsilon)
  let x = a + GOLDEN * (b - a);
  let w = x;
  let v = x;
  let fx = f(x);
  let fw = fx;
  let fv = fx;
  let d = 0;
  let e = 0;
  let evaluations = 1;
  while (evaluations < maxEval) {
    const m = 0.5 * (a + b);
    const tol1 = eps * Math.abs(x) + tol / 3;
    const tol2 = 2 * tol1;
    if (Math.abs(x - m) <= tol2 - 0.5 * (b - a)) {
      return { x, value: fx, evaluations, converged: true, reason: '' };
    }
    let useGolden = true;
    if (Math.abs(e) > tol1) {
      // try a parabola through x, w, v
      let r = (x - w) * (fx - fv);
      let q = (x - v) * (fx - fw);
      let p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p;
      else q = -q;
      r = e;
      e = d;
      if (Math.abs(p) < Math.abs(0.5 * q * r) && p > q * (a - x) && p < q * (b - x)) {
        d = p / q;
        const u = x + d;
        if (u - a < tol2 || b - u < tol2) d = x < m ? tol1 : -tol1;
        useGolden = false;
      }
    }
    if (useGolden) {
      e = (x < m ? b : a) - x;
      d = GOLDEN * e;
    }
    const u = Math.abs(d) >= tol1 ? x + d : x + (d > 0 ? tol1 : -tol1);
    const fu = f(u);
    evaluations++;
    if (fu <= fx) {
      if (u < x) b = x;
      else a = x;
      v = w; fv = fw;
      w = x; fw = fx;
      x = u; fx = fu;
    } else {
      if (u < x) a = u;
      else b = u;
      if (fu <= fw || w === x) {
        v = w; fv = fw;
        w = u; fw = fu;
      } else if (fu <= fv || v === x || v === w) {
        v = u; fv = fu;
      }
    }
  }
  return { x, value: fx, evaluations, converged: false, reason: `evaluation limit ${maxEval} reached` };
}
