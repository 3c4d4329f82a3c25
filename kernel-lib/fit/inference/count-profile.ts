/**
 * Profile-likelihood intervals for count and detection fits (Poisson, binomial, negative binomial):
 * the values v of one parameter where 2·[ℓ̂ − ℓ_p(v)] stays below χ²₁ at the level, every other
 * parameter re-maximised (Venzon and Moolgavkar 1988, Applied Statistics 37:87; Pawitan 2001,
 * In All Likelihood, §2.4 and §3.4). ℓ is the likelihood the fit maximises: exact for a GLM, the
 * Laplace approximation or adaptive Gauss-Hermite quadrature for a mixed model.
 *
 * - Fixed effect βⱼ: refit with column j removed and v·xⱼ added to the offset (θ, the other β and
 *   the NB aggregation k re-estimated).
 * - Random-effect SD (link scale): the fit with θ held, the other variance parameters re-optimised
 *   in the SD-correlation parameterisation of ./profile. A lower limit the profile never reaches
 *   above 0 is reported as 0 (`lowerAtZero`), with the reason in the warnings.
 * The fitting goes through estimateCountModel only.
 */
import type { DesignMatrices } from '../../data/design-matrices';
import { restrictColumns } from '../aliasing';
import { estimateCountModel, type CountEstimate, type CountFitOptions } from '../estimate/count-model';
import { brentMinimise } from '../../numeric/brent';
import { nelderMeadBounded } from '../../numeric/nelder-mead';
import { profileCutoff, profileLimits, sdFromTheta, sdLayout, thetaFromSd, type ProfileInterval } from './profile';

/** A count fit as the interval methods need it: the estimable design, how it was fitted, and the estimate. */
export interface CountContext {
  /** Design restricted to the estimable columns. */
  design: DesignMatrices;
  /** Family, trials, offset, integration and nodes of the fit. */
  options: CountFitOptions;
  estimate: CountEstimate;
}

/** The fit's own options with a different offset and/or held θ. */
function refit(ctx: CountContext, design: DesignMatrices, offset: Float64Array | undefined, theta?: ArrayLike<number>): CountEstimate {
  return estimateCountModel(design, { ...ctx.options, offset, theta, priority: undefined });
}

/** −2ℓ of a refit, NaN when it could not be evaluated. */
function deviance(est: CountEstimate): number {
  return Number.isFinite(est.logLik) ? -2 * est.logLik : NaN;
}

/** Profile intervals for every estimable fixed effect, in column order. */
export function countProfileFixed(ctx: CountContext, level: number): ProfileInterval[] {
  const z = profileCutoff(level);
  const { design, estimate } = ctx;
  const { n, p, X } = design;
  const dHat = -2 * estimate.logLik;
  const base = ctx.options.offset ?? new Float64Array(n);
  const out: ProfileInterval[] = [];
  for (let j = 0; j < p; j++) {
    const keep = Array.from({ length: p }, (_, a) => a).filter((a) => a !== j);
    const minus = restrictColumns(design, keep);
    const zeta = (delta: number): number => {
      if (delta === 0) return 0;
      const v = estimate.beta[j] + delta;
      // a fresh array per value: the fitting keeps workspaces per (design, offset array)
      const offset = new Float64Array(n);
      for (let i = 0; i < n; i++) offset[i] = base[i] + v * X[i * p + j];
      const d = deviance(refit(ctx, minus, offset));
      return Number.isNaN(d) ? NaN : Math.sign(delta) * Math.sqrt(Math.max(0, d - dHat));
    };
    const se = Math.sqrt(estimate.cov[j * p + j]);
    const scale = Number.isFinite(se) && se > 0 ? se : 1;
    const lim = profileLimits(zeta, 0, scale, z, false, design.fixedNames[j]);
    out.push({ ...lim, lower: estimate.beta[j] + lim.lower, upper: estimate.beta[j] + lim.upper });
  }
  return out;
}

const T_MAX = 20;
const W_MAX = 1e4;

/**
 * Profile interval of the SD (link scale) of component `effect` of engine term `term`.
 * D(v) = min over the other t and w of −2ℓ with θ held at thetaFromSd(φ).
 */
function countProfileSd(ctx: CountContext, term: number, effect: number, level: number, label: string): ProfileInterval {
  const z = profileCutoff(level);
  const layoutDev = ctx.estimate.layout!;
  const layout = sdLayout(layoutDev);
  const phiHat = sdFromTheta(layoutDev, layout, ctx.estimate.theta, 1);
  const target = layout.tIndex[term][effect];
  // φ[0] (log σ) does not exist for these families: it stays at 0
  const free: number[] = [];
  for (let i = 1; i < layout.size; i++) if (i !== target) free.push(i);
  const isT = (i: number) => layout.tIndex.some((row) => row.includes(i));
  const lower = free.map((i) => (isT(i) ? 0 : -W_MAX));
  const upper = free.map((i) => (isT(i) ? T_MAX : W_MAX));
  const phi = Float64Array.from(phiHat);
  const theta = new Float64Array(layoutDev.thetaLength);
  const dHat = -2 * ctx.estimate.logLik;
  const criterion = (x: ArrayLike<number>): number => {
    for (let a = 0; a < free.length; a++) phi[free[a]] = x[a];
    thetaFromSd(layoutDev, layout, phi, theta);
    const d = deviance(refit(ctx, ctx.design, ctx.options.offset, theta));
    return Number.isNaN(d) ? Infinity : d;
  };
  let start = free.map((i) => phiHat[i]);
  const minimise = (v: number): number => {
    phi[target] = v;
    if (free.length === 0) return criterion([]);
    if (free.length === 1) {
      const i = free[0];
      if (isT(i)) {
        const res = brentMinimise((u) => criterion([u / (1 - u)]), 0, T_MAX / (1 + T_MAX), { tolerance: 1e-8 });
        return res.value;
      }
      return brentMinimise((w) => criterion([w]), -W_MAX, W_MAX, { tolerance: 1e-8 }).value;
    }
    const res = nelderMeadBounded((x) => criterion(x), start, lower, upper, { step: 0.1, fTolerance: 1e-8, xTolerance: 1e-5 });
    start = Array.from(res.x);
    return res.value;
  };
  const est = phiHat[target];
  let side = 0;
  const zeta = (v: number): number => {
    if (v === est) return 0;
    const here = Math.sign(v - est);
    if (here !== side) { start = free.map((i) => phiHat[i]); side = here; }
    const d = minimise(v);
    return Number.isFinite(d) ? here * Math.sqrt(Math.max(0, d - dHat)) : NaN;
  };
  const scale = est > 0 ? 0.2 * est : 0.2;
  const out = profileLimits(zeta, est, scale, z, true, label);
  if (out.lowerAtZero) {
    out.warnings.push(`profile of ${label}: the likelihood at SD = 0 is within the ${level} cutoff of its maximum, so the lower limit is the boundary 0`);
  }
  return out;
}

/** Profile intervals for every random-effect SD, in the design's term order. */
export function countProfileSds(ctx: CountContext, level: number): ProfileInterval[] {
  const layoutDev = ctx.estimate.layout;
  if (!layoutDev) return [];
  const out: ProfileInterval[] = [];
  for (const term of ctx.design.random) {
    const s = layoutDev.termIndex.get(term)!;
    term.terms.forEach((name, i) => {
      out.push(countProfileSd(ctx, s, i, level, `sd(${term.factor}${name === 'intercept' ? '' : `:${name}`})`));
    });
  }
  return out;
}
