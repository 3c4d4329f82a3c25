import { brentMinimise } from '../numeric/brent';
import { nelderMeadBounded } from '../numeric/nelder-mead';
import type { ProfiledDeviance } from './profiled-deviance';

export interface ThetaOptimum {
  theta: Float64Array;
  deviance: number;
  evaluations: number;
  converged: boolean;
  reason: string;
}

/** θ below this (relative to the residual SD) counts as on the boundary (common practice, no source). */
export const BOUNDARY_TOLERANCE = 1e-4;

/** Largest θ searched in one dimension: a random-effect SD 10⁴ times the residual SD. */
const THETA_MAX = 1e4;

/**
 * Minimise the profiled deviance over θ. One parameter: Brent on the map θ = t/(1−t), t ∈ [0, 1),
 * which keeps the search bounded while reaching any θ ≥ 0. Several: bounded Nelder-Mead, restarted
 * once from its own optimum (a restart guards against the simplex collapsing early; Nelder and
 * Mead 1965, §3). Parameters near zero are then tried at exactly zero so boundary fits are exact.
 */
export function optimiseTheta(dev: ProfiledDeviance, start?: ArrayLike<number>): ThetaOptimum {
  const d = dev.thetaLength;
  let evaluations = 0;
  let theta: Float64Array;
  let value: number;
  let converged: boolean;
  let reason: string;
  if (d === 1) {
    const buf = new Float64Array(1);
    const tMax = THETA_MAX / (1 + THETA_MAX);
    const res = brentMinimise((t) => { buf[0] = t / (1 - t); return dev.evaluate(buf); }, 0, tMax, { tolerance: 1e-10 });
    evaluations += res.evaluations;
    theta = Float64Array.of(res.x / (1 - res.x));
    value = res.value;
    converged = res.converged;
    reason = res.reason;
    if (res.x > tMax * (1 - 1e-6)) {
      converged = false;
      reason = 'random-effect SD ran to the upper search limit (10⁴ × residual SD): the residual variance is near zero';
    }
  } else {
    const upper = new Float64Array(d).fill(THETA_MAX);
    const lower = dev.lowerBounds;
    const lowerFinite = Float64Array.from(lower, (v) => (Number.isFinite(v) ? v : -THETA_MAX));
    const s = start ?? dev.momentTheta();
    const f = (x: Float64Array) => dev.evaluate(x);
    let res = nelderMeadBounded(f, s, lowerFinite, upper, { step: 0.25 });
    evaluations += res.evaluations;
    const again = nelderMeadBounded(f, res.x, lowerFinite, upper, { step: 0.05 });
    evaluations += again.evaluations;
    if (again.value <= res.value) res = again;
    theta = res.x;
    value = res.value;
    converged = res.converged && again.converged;
    reason = res.converged ? again.reason : res.reason;
  }
  // snap near-boundary parameters to exactly zero when that is no worse
  for (let i = 0; i < d; i++) {
    if (dev.lowerBounds[i] === 0 && theta[i] > 0 && theta[i] < BOUNDARY_TOLERANCE) {
      const trial = Float64Array.from(theta);
      trial[i] = 0;
      const v = dev.evaluate(trial);
      evaluations++;
      if (v <= value + 1e-10) { theta = trial; value = Math.min(v, value); }
    }
  }
  if (!Number.isFinite(value)) {
    converged = false;
    reason = dev.lastFailure || 'the deviance could not be evaluated';
  }
  return { theta, deviance: value, evaluations, converged, reason };
}
