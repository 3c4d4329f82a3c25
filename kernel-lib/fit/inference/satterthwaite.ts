/**
 * Satterthwaite degrees of freedom for linear contrasts of the fixed effects
 * (Satterthwaite 1946, Biometrics Bulletin 2:110; Giesbrecht and Burns 1985, Biometrics 41:477;
 * multi-df F by Fai and Cornelius 1996, J. Statist. Comput. Simul. 54:363):
 *   ν(c) = 2 (cᵀΦc)² / (gᵀ A g),  g_r = ∂(cᵀΦ(ψ)c)/∂ψ_r,  A = Cov(ψ̂) = (observed information)⁻¹.
 *
 * Derivatives: central finite differences in ψ (variance scale, ./variance-parameters) of
 *  - the unprofiled criterion −2ℓ(θ, σ²) = log|L|² [+ log|RX|²] + ν log(2πσ²) + r²(θ)/σ² for the
 *    Hessian (so A = 2 H⁻¹, the inverse observed information of the REML or ML criterion);
 *  - Φ(ψ) = σ² (RXᵀRX)⁻¹ for g.
 * Every point costs one factorisation of the penalised system, so the whole computation is
 * 1 + 4d² evaluations for d free variance parameters, independent of n and of the number of contrasts.
 * Steps are relative, h_r = η·scale_r with η = 1e-3, and each difference is Richardson-extrapolated
 * from steps h and 2h (fourth-order accurate), which leaves rounding, O(ε/η²), as the main error:
 * about 1e-8 relative in ν at an exact optimum (in practice the optimiser's precision dominates) (Nocedal and Wright, Numerical Optimization, 2nd ed. 2006, §8.1;
 * Richardson extrapolation: Burden and Faires, Numerical Analysis, 9th ed. 2011, §4.2).
 */
import type { ProfiledDeviance } from '../profiled-deviance';
import { thetaFromPsi, unprofiledDeviance, varianceParameters, type VarianceParameters } from './variance-parameters';
import { inverseSpd, quadraticForm } from './dense-ops';

/** Relative finite-difference step, shrunk tenfold (twice at most) when a point leaves the parameter space. */
const FD_STEP = 1e-3;

export interface SatterthwaiteCore {
  p: number;
  /** Φ̂ = σ̂²(RXᵀRX)⁻¹, p×p. */
  phi: Float64Array;
  /** ∂Φ/∂ψ_r for each free parameter r, p×p each. */
  gradients: Float64Array[];
  /** A = Cov(ψ̂) over the free parameters (f×f), or null when the information is not positive definite. */
  covariance: Float64Array | null;
  params: VarianceParameters;
  warnings: string[];
}

/** Steps (in units of h) and weights of the five-point first-derivative stencil. */
const STENCIL: [number, number][] = [[2, -1], [1, 8], [-1, -8], [-2, 1]];
const CORNERS: [number, number][] = [[1, 1], [1, -1], [-1, 1], [-1, -1]];

/** Finite-difference step for ψ entry r: relative to the variance, or to √(Σaa Σbb) for a covariance. */
function stepFor(params: VarianceParameters, r: number): number {
  const e = params.entries[r];
  if (e.term < 0 || e.a === e.b) return FD_STEP * params.values[r];
  const ia = params.entries.findIndex((x) => x.term === e.term && x.a === e.a && x.b === e.a);
  const ib = params.entries.findIndex((x) => x.term === e.term && x.a === e.b && x.b === e.b);
  return FD_STEP * Math.sqrt(params.values[ia] * params.values[ib]);
}

/**
 * Everything the Satterthwaite df need, at the estimate (θ̂, σ̂²) of `dev`'s criterion.
 * Leaves `dev` factored at θ̂ again.
 */
export function satterthwaiteCore(dev: ProfiledDeviance, thetaHat: ArrayLike<number>, sigma2: number): SatterthwaiteCore {
  const p = dev.p;
  const params = varianceParameters(dev, thetaHat, sigma2);
  const warnings: string[] = [];
  if (params.heldFixed.length) {
    warnings.push(`Satterthwaite df: ${params.heldFixed.join(', ')} on the boundary, held fixed at the estimate (not counted as estimated)`);
  }
  const free = params.free;
  const f = free.length;
  const psi = Float64Array.from(params.values);
  const theta = new Float64Array(dev.thetaLength);
  const col = new Float64Array(Math.max(p, 1));
  const criterion = (): number => {
    const s2 = thetaFromPsi(dev, params, psi, thetaHat, theta);
    return Number.isNaN(s2) ? Infinity : unprofiledDeviance(dev, theta, s2);
  };
  const pp = p * p;
  const scratch = new Float64Array(pp);
  // add weight·Φ at the current ψ to `into` (call right after criterion(), which factored at that point)
  const addPhi = (into: Float64Array, weight: number): void => {
    dev.unscaledFixedCovariance(scratch, col);
    const w = weight * psi[psi.length - 1];
    for (let k = 0; k < pp; k++) into[k] += w * scratch[k];
  };
  let attempt = differences(1);
  for (let shrink = 10; !attempt.finite && shrink <= 100; shrink *= 10) attempt = differences(1 / shrink);
  const { phi, gradients, hessian } = attempt;

  /** Φ, ∂Φ/∂ψ and the Hessian of −2ℓ at steps scaled by `scale`. */
  function differences(scale: number) {
    const steps = free.map((r) => scale * stepFor(params, r));
    let finite = true;
    const value = (): number => {
      const v = criterion();
      if (!Number.isFinite(v)) finite = false;
      return v;
    };
    const move = (i: number, t: number) => { psi[free[i]] = params.values[free[i]] + t * steps[i]; };
    const reset = (i: number) => { psi[free[i]] = params.values[free[i]]; };
    const f0 = value();
    const phi0 = new Float64Array(pp);
    addPhi(phi0, 1);
    const grads: Float64Array[] = [];
    const h = new Float64Array(f * f);
    const vals = new Float64Array(4);
    for (let i = 0; i < f; i++) {
      const g = new Float64Array(pp);
      // five-point stencils: f'' = (−f₂ + 16f₁ − 30f₀ + 16f₋₁ − f₋₂)/12h², Φ' = (−Φ₂ + 8Φ₁ − 8Φ₋₁ + Φ₋₂)/12h, both O(h⁴)
      STENCIL.forEach(([t, wPhi], k) => {
        move(i, t);
        vals[k] = value();
        addPhi(g, wPhi / (12 * steps[i]));
        reset(i);
      });
      h[i * f + i] = (-vals[0] + 16 * vals[1] - 30 * f0 + 16 * vals[2] - vals[3]) / (12 * steps[i] * steps[i]);
      grads.push(g);
      for (let j = 0; j < i; j++) {
        // cross differences at steps h and 2h, Richardson-combined: O(h⁴)
        const cross = (t: number) => {
          let sum = 0;
          for (const [si, sj] of CORNERS) { move(i, si * t); move(j, sj * t); sum += si * sj * value(); }
          reset(i);
          reset(j);
          return sum / (4 * t * t * steps[i] * steps[j]);
        };
        h[i * f + j] = h[j * f + i] = (4 * cross(1) - cross(2)) / 3;
      }
    }
    return { phi: phi0, gradients: grads, hessian: h, finite: finite && Number.isFinite(f0) };
  }
  dev.factor(thetaHat);
  let covariance: Float64Array | null = null;
  const inv = attempt.finite ? inverseSpd(hessian, f) : null;
  if (inv) {
    // H is the Hessian of −2ℓ: the observed information is H/2, so Cov(ψ̂) = 2 H⁻¹
    covariance = inv.map((v) => 2 * v);
  } else {
    warnings.push('Satterthwaite df: the curvature of the likelihood in the variance parameters is not positive definite at the estimate (not a proper optimum); df not available');
  }
  return { p, phi, gradients, covariance, params, warnings };
}

/** ν(c) for a contrast c (length p); NaN when the covariance of ψ̂ is unavailable. */
export function satterthwaiteDf(core: SatterthwaiteCore, c: ArrayLike<number>): number {
  if (!core.covariance) return NaN;
  const f = core.gradients.length;
  const v = quadraticForm(core.phi, c, core.p);
  const g = core.gradients.map((d) => quadraticForm(d, c, core.p));
  let gag = 0;
  for (let i = 0; i < f; i++) for (let j = 0; j < f; j++) gag += g[i] * core.covariance[i * f + j] * g[j];
  if (!(gag > 0)) return Infinity; // Φ does not move with ψ: the variance of cᵀβ̂ is known
  return (2 * v * v) / gag;
}
