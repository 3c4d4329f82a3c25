import { choleskyInPlace, forwardSolveInPlace, backSolveTransposeInPlace } from './dense';
import type { MinimiseResult } from './nelder-mead';

export interface NewtonOptions {
  /** Stop when the Newton decrement gᵀH⁻¹g (the predicted decrease, doubled) is below this. Default 1e-10. */
  decrementTolerance?: number;
  /** Default 100. */
  maxIterations?: number;
  /** Relative step of the forward differences of the gradient that form the Hessian. Default 1e-6. */
  differenceStep?: number;
  /**
   * 'differences': the Hessian by differences at every iteration (d extra gradients each);
   * 'bfgs' (default): by differences at the start, then BFGS updates, formed by differences again
   * only when an update fails the curvature condition or a step needs halving.
   */
  hessian?: 'differences' | 'bfgs';
  /** A Hessian (d × d, row-major) to start from instead of differences (e.g. that of a nearby problem). */
  hessianStart?: ArrayLike<number>;
  /** Where to keep the working Hessian; it holds the last approximation on return. */
  hessianOut?: Float64Array;
}

/**
 * Minimise a smooth f over the box lower ≤ x ≤ upper from its gradient: Newton's method with the
 * Hessian formed by forward differences of the gradient (then kept up to date by BFGS updates),
 * shifted towards the identity (Levenberg) until positive definite, and a backtracking Armijo line
 * search (Nocedal and Wright 2006, Numerical Optimization, 2nd ed., §3.1, §3.4, §6.1 and §8.1). Coordinates on a bound whose gradient points out of the
 * box are held there for the step (a projected Newton step, Bertsekas 1982, SIAM J. Control Optim.
 * 20:221). `fg(x, g)` returns f(x) and writes ∇f(x) into g; f may return Infinity outside its domain.
 * Allocates O(d²) once per call; nothing per iteration.
 */
export function newtonMinimise(
  fg: (x: Float64Array, g: Float64Array) => number,
  start: ArrayLike<number>,
  lower: ArrayLike<number>,
  upper: ArrayLike<number>,
  options: NewtonOptions = {},
): MinimiseResult {
  const d = start.length;
  const tol = options.decrementTolerance ?? 1e-10;
  const maxIter = options.maxIterations ?? 100;
  const rel = options.differenceStep ?? 1e-6;
  const x = new Float64Array(d);
  for (let a = 0; a < d; a++) x[a] = Math.min(upper[a], Math.max(lower[a], start[a]));
  const g = new Float64Array(d);
  const gt = new Float64Array(d);
  const xt = new Float64Array(d);
  const hess = options.hessianOut ?? new Float64Array(d * d);
  const sys = new Float64Array(d * d);
  const step = new Float64Array(d);
  const free = new Uint8Array(d);
  const moved = new Float64Array(d);
  const bs = new Float64Array(d);
  const bfgs = (options.hessian ?? 'bfgs') === 'bfgs';
  let fresh = true;
  if (options.hessianStart) {
    for (let a = 0; a < d * d; a++) hess[a] = options.hessianStart[a];
    fresh = false;
  }
  let lastDecrease = Infinity;
  let evaluations = 1;
  let f = fg(x, g);
  if (!Number.isFinite(f)) return { x, value: f, evaluations, converged: false, reason: 'the objective is not finite at the start' };
  for (let it = 0; it < maxIter; it++) {
    // Hessian by forward differences of the gradient (backward at an upper bound), symmetrised
    for (let a = 0; a < d && fresh; a++) {
      let h = rel * Math.max(1, Math.abs(x[a]));
      if (x[a] + h > upper[a]) h = -h;
      xt.set(x);
      xt[a] += h;
      evaluations++;
      fg(xt, gt);
      for (let b = 0; b < d; b++) hess[b * d + a] = (gt[b] - g[b]) / h;
    }
    if (fresh) {
      for (let a = 0; a < d; a++) {
        for (let b = 0; b < a; b++) hess[a * d + b] = hess[b * d + a] = 0.5 * (hess[a * d + b] + hess[b * d + a]);
      }
    }
    const differenced = fresh;
    fresh = !bfgs;
    let nFree = 0;
    for (let a = 0; a < d; a++) {
      const held = (x[a] <= lower[a] && g[a] > 0) || (x[a] >= upper[a] && g[a] < 0);
      free[a] = held ? 0 : 1;
      if (!held) nFree++;
    }
    if (nFree === 0) return { x, value: f, evaluations, converged: true, reason: '' };
    // (H + λI) s = −g on the free coordinates, λ raised until the factorisation succeeds
    let scale = 0;
    for (let a = 0; a < d; a++) if (free[a]) scale = Math.max(scale, Math.abs(hess[a * d + a]));
    let lambda = 0;
    let factored = false;
    for (let tries = 0; tries < 40 && !factored; tries++) {
      let r = 0;
      for (let a = 0; a < d; a++) {
        if (!free[a]) continue;
        let c = 0;
        for (let b = 0; b < d; b++) if (free[b]) sys[r * nFree + c++] = hess[a * d + b] + (a === b ? lambda : 0);
        step[r++] = -g[a];
      }
      if (choleskyInPlace(sys, nFree) < 0) factored = true;
      else lambda = lambda === 0 ? 1e-8 * (scale + 1) : 10 * lambda;
    }
    if (!factored) return { x, value: f, evaluations, converged: false, reason: 'the Newton system could not be factored' };
    forwardSolveInPlace(sys, nFree, step);
    backSolveTransposeInPlace(sys, nFree, step);
    // spread the free step back to all coordinates (held ones do not move)
    for (let a = d - 1, r = nFree - 1; a >= 0; a--) step[a] = free[a] ? step[r--] : 0;
    let slope = 0;
    for (let a = 0; a < d; a++) slope += g[a] * step[a];
    if (-slope < tol) {
      if (differenced || lastDecrease < 1e3 * tol) return { x, value: f, evaluations, converged: true, reason: '' };
      // confirm with a differenced Hessian unless the updated one has already predicted a small step
      // well (an update far from the optimum may understate the remaining decrease)
      fresh = true;
      continue;
    }
    // backtracking line search on the projected step
    let t = 1;
    let accepted = false;
    for (let h = 0; h < 40; h++) {
      for (let a = 0; a < d; a++) xt[a] = Math.min(upper[a], Math.max(lower[a], x[a] + t * step[a]));
      evaluations++;
      const ft = fg(xt, gt);
      if (ft <= f + 1e-4 * t * slope) {
        if (bfgs) fresh = h > 0 || !bfgsUpdate(hess, d, x, xt, g, gt, moved, bs);
        x.set(xt);
        g.set(gt);
        const change = f - ft;
        lastDecrease = change;
        f = ft;
        accepted = true;
        if (change <= 1e-14 * (Math.abs(f) + 1) && -slope < 1e3 * tol) return { x, value: f, evaluations, converged: true, reason: '' };
        break;
      }
      t *= 0.5;
    }
    if (!accepted && !differenced) {
      fresh = true;
      continue;
    }
    if (!accepted) {
      // no decrease along a descent direction: x is optimal to the precision of f when the predicted decrease is tiny
      evaluations++;
      f = fg(x, g);
      const tiny = -slope < 1e-6 * (Math.abs(f) + 1);
      return { x, value: f, evaluations, converged: tiny, reason: tiny ? '' : 'the line search found no decrease' };
    }
  }
  return { x, value: f, evaluations, converged: false, reason: `no convergence in ${maxIter} Newton iterations` };
}

/** B ← B − B s sᵀ B / sᵀBs + y yᵀ / sᵀy (Nocedal and Wright 2006, eq. 6.19); false (B kept) when sᵀy ≤ 0. */
function bfgsUpdate(
  hess: Float64Array, d: number, x: Float64Array, xNew: Float64Array, g: Float64Array, gNew: Float64Array,
  s: Float64Array, bs: Float64Array,
): boolean {
  let sy = 0;
  let ss = 0;
  let yy = 0;
  for (let a = 0; a < d; a++) {
    s[a] = xNew[a] - x[a];
    const y = gNew[a] - g[a];
    sy += s[a] * y;
    ss += s[a] * s[a];
    yy += y * y;
  }
  if (!(sy > 1e-10 * Math.sqrt(ss * yy))) return false;
  let sbs = 0;
  for (let a = 0; a < d; a++) {
    let v = 0;
    for (let b = 0; b < d; b++) v += hess[a * d + b] * s[b];
    bs[a] = v;
    sbs += s[a] * v;
  }
  if (!(sbs > 0)) return false;
  for (let a = 0; a < d; a++) {
    const ya = gNew[a] - g[a];
    for (let b = 0; b < d; b++) hess[a * d + b] += (ya * (gNew[b] - g[b])) / sy - (bs[a] * bs[b]) / sbs;
  }
  return true;
}
