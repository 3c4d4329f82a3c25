/** Result of a bracketed root search. */
export interface RootResult {
  x: number;
  evaluations: number;
  converged: boolean;
}

/**
 * Root of f in [a, b] where f(a) and f(b) differ in sign: bisection safeguarding inverse quadratic
 * interpolation and the secant step. Brent, Algorithms for Minimization without Derivatives (1973),
 * ch. 4, procedure "zero". `fa`, `fb` may be passed when already known.
 */
export function brentRoot(
  f: (x: number) => number, a: number, b: number,
  options: { tolerance?: number; maxEvaluations?: number; fa?: number; fb?: number } = {},
): RootResult {
  const tol = options.tolerance ?? 1e-12;
  const maxEval = options.maxEvaluations ?? 200;
  const eps = 2.220446049250313e-16;
  let fa = options.fa ?? f(a);
  let fb = options.fb ?? f(b);
  let evaluations = (options.fa === undefined ? 1 : 0) + (options.fb === undefined ? 1 : 0);
  if (fa === 0) return { x: a, evaluations, converged: true };
  if (fb === 0) return { x: b, evaluations, converged: true };
  if ((fa > 0) === (fb > 0)) return { x: NaN, evaluations, converged: false };
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  while (evaluations < maxEval) {
    if ((fb > 0) === (fc > 0)) { c = a; fc = fa; d = b - a; e = d; }
    if (Math.abs(fc) < Math.abs(fb)) { a = b; b = c; c = a; fa = fb; fb = fc; fc = fa; }
    const tol1 = 2 * eps * Math.abs(b) + 0.5 * tol;
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol1 || fb === 0) return { x: b, evaluations, converged: true };
    if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
      let p: number;
      let q: number;
      const s = fb / fa;
      if (a === c) {
        p = 2 * m * s;
        q = 1 - s;
      } else {
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q; else p = -p;
      if (2 * p < Math.min(3 * m * q - Math.abs(tol1 * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = m;
        e = m;
      }
    } else {
      d = m;
      e = m;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol1 ? d : m > 0 ? tol1 : -tol1;
    fb = f(b);
    evaluations++;
  }
  return { x: b, evaluations, converged: false };
}
