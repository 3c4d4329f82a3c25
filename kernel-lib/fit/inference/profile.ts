/**
 * Profile-likelihood intervals (Venzon and Moolgavkar 1988, Applied Statistics 37:87; for mixed
 * models Bates et al. 2015, J. Stat. Softw. 67(1), on profiling the deviance): the set of values v of one parameter at
 * which the likelihood-ratio statistic D(v) − D̂, every other parameter re-optimised, stays below the
 * chi-square(1) quantile at the level. Found by root finding on the signed root
 * ζ(v) = sign(v − v̂)·√(D(v) − D̂), which is nearly linear in v, at ζ = ±z, z² = χ²₁(level).
 *
 * - Fixed effect βⱼ: refit with βⱼ = v as an offset (column j removed, y − v·xⱼ). Always on the
 *   ML criterion: the REML criterion depends on X, so its values with and without column j are not
 *   comparable. The interval surrounds the ML estimate.
 * - Random-effect SD, residual SD (on the SD scale) and relative SD (random SD / residual SD):
 *   the model's own criterion (REML or ML), with the other variance parameters re-optimised in the
 *   SD-correlation parameterisation below.
 * A lower limit that the profile never reaches above 0 is reported as 0 (`lowerAtZero`).
 */
import { ProfiledDeviance } from '../profiled-deviance';
import { optimiseTheta } from '../optimise-theta';
import { restrictColumns } from '../aliasing';
import { brentMinimise } from '../../numeric/brent';
import { brentRoot } from '../../numeric/brent-root';
import { nelderMeadBounded } from '../../numeric/nelder-mead';
import { normalQuantile } from '../../numeric/distributions';
import type { InferenceContext } from './context';
import { unprofiledDeviance } from './variance-parameters';

export interface ProfileInterval {
  lower: number;
  upper: number;
  /** The profile stays below the cutoff down to 0: the lower limit is the boundary. */
  lowerAtZero: boolean;
  /** D(v) − D̂ at the reported limits (NaN for a limit at 0 or not found). */
  statisticAtLower: number;
  statisticAtUpper: number;
  warnings: string[];
}

/** Largest excursion searched, in units of the starting scale (SE or SD). */
const MAX_EXPANSION = 2 ** 20;

/**
 * Limits where ζ(v) = ±z. `zeta` returns the signed root; the search starts at estimate ± scale and
 * doubles the step until ζ crosses. With `floorZero`, v stays ≥ 0.
 */
export function profileLimits(
  zeta: (v: number) => number, estimate: number, scale: number, z: number, floorZero: boolean, what: string,
): ProfileInterval {
  const warnings: string[] = [];
  const find = (sign: 1 | -1): { v: number; atZero: boolean } => {
    const target = sign * z;
    const g = (v: number) => zeta(v) - target;
    let inner = estimate;
    let gInner = -sign * z; // ζ(v̂) = 0
    let step = scale;
    for (let k = 0; k < 60 && step <= MAX_EXPANSION * scale; k++, step *= 2) {
      let outer = estimate + sign * step;
      if (floorZero && outer <= 0) {
        outer = 0;
        const g0 = g(0);
        if (!(sign * g0 >= 0)) return { v: 0, atZero: true };
        return { v: brentRoot(g, inner, 0, { tolerance: 1e-10 * scale, fa: gInner, fb: g0 }).x, atZero: false };
      }
      const gOuter = g(outer);
      if (Number.isNaN(gOuter)) break;
      if (sign * gOuter >= 0) {
        return { v: brentRoot(g, inner, outer, { tolerance: 1e-10 * scale, fa: gInner, fb: gOuter }).x, atZero: false };
      }
      inner = outer;
      gInner = gOuter;
    }
    warnings.push(`profile of ${what}: the ${sign > 0 ? 'upper' : 'lower'} limit was not reached within ${MAX_EXPANSION} × ${scale.toPrecision(3)} of the estimate`);
    return { v: sign > 0 ? Infinity : floorZero ? 0 : -Infinity, atZero: false };
  };
  const lo = find(-1);
  const hi = find(1);
  const stat = (v: number) => (Number.isFinite(v) && !(floorZero && v === 0 && lo.atZero) ? zeta(v) ** 2 : NaN);
  return { lower: lo.v, upper: hi.v, lowerAtZero: lo.atZero, statisticAtLower: stat(lo.v), statisticAtUpper: stat(hi.v), warnings };
}

/** z with z² = χ²₁ quantile at the level. */
export function profileCutoff(level: number): number {
  return normalQuantile(0.5 + level / 2);
}

/** The ML optimum of the context's design, centred on the response residual for accuracy. */
interface MlOptimum {
  theta: Float64Array;
  deviance: number;
  beta: Float64Array;
  se: Float64Array;
}

function minimiseTheta(dev: ProfiledDeviance, start: ArrayLike<number>): { theta: Float64Array; deviance: number } {
  if (dev.thetaLength === 0) return { theta: new Float64Array(0), deviance: dev.evaluate([]) };
  const opt = optimiseTheta(dev, start);
  return { theta: opt.theta, deviance: opt.deviance };
}

function mlOptimum(ctx: InferenceContext): MlOptimum {
  const dev = new ProfiledDeviance(ctx.design, false);
  const { theta, deviance } = minimiseTheta(dev, ctx.theta);
  dev.factor(theta);
  const beta = dev.beta();
  const s2 = dev.sigma2();
  const u = dev.unscaledFixedCovariance();
  const se = Float64Array.from({ length: dev.p }, (_, j) => Math.sqrt(s2 * u[j * dev.p + j]));
  return { theta, deviance, beta, se };
}

/** Profile intervals for every estimable fixed effect (ML criterion). */
export function profileFixedEffects(ctx: InferenceContext, level: number): ProfileInterval[] {
  const z = profileCutoff(level);
  const ml = mlOptimum(ctx);
  const { design } = ctx;
  const { n, p, X, y } = design;
  // responses relative to the ML fit: the profile of βⱼ is then a profile in δ = βⱼ − β̂ⱼ
  const resid = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = y[i];
    for (let a = 0; a < p; a++) s -= X[i * p + a] * ml.beta[a];
    resid[i] = s;
  }
  const out: ProfileInterval[] = [];
  for (let j = 0; j < p; j++) {
    const keep = Array.from({ length: p }, (_, a) => a).filter((a) => a !== j);
    const minus = restrictColumns({ ...design, y: resid }, keep);
    const dev = new ProfiledDeviance(minus, false);
    const shifted = new Float64Array(n);
    let start: Float64Array = ml.theta;
    let side = 0;
    const zeta = (delta: number): number => {
      if (delta === 0) return 0;
      if (Math.sign(delta) !== side) { start = ml.theta; side = Math.sign(delta); }
      for (let i = 0; i < n; i++) shifted[i] = resid[i] - delta * X[i * p + j];
      dev.setResponse(shifted);
      const opt = minimiseTheta(dev, start);
      start = opt.theta;
      const d = Math.max(0, opt.deviance - ml.deviance);
      return Math.sign(delta) * Math.sqrt(d);
    };
    const lim = profileLimits(zeta, 0, ml.se[j], z, false, design.fixedNames[j]);
    out.push({ ...lim, lower: ml.beta[j] + lim.lower, upper: ml.beta[j] + lim.upper });
  }
  return out;
}

// -------------------------------------------------------------------------------------------------
// Variance parameters in the SD-correlation parameterisation: φ = [log σ, t₁ … t_K, w …], where
// tᵢ = (SD of random effect i)/σ and each correlated term's template is T = diag(t)·L_R with L_R
// the Cholesky factor of the correlation matrix, row i = (wᵢ₁, …, wᵢ,ᵢ₋₁, 1)/‖·‖ (any real w gives a
// valid correlation matrix; Pinheiro and Bates 1996, Statistics and Computing 6:289).

export interface SdLayout {
  /** φ index of tᵢ for each θ-template row, per engine term: tIndex[s][i]. */
  tIndex: number[][];
  /** φ index of w for correlated terms: wIndex[s][i][j] (j < i). */
  wIndex: number[][][];
  size: number;
}

export function sdLayout(dev: ProfiledDeviance): SdLayout {
  let next = 1;
  const tIndex = dev.terms.map((t) => Array.from({ length: t.k }, () => next++));
  const wIndex = dev.terms.map((t) =>
    Array.from({ length: t.k }, (_, i) => (t.term.correlated ? Array.from({ length: i }, () => next++) : [])));
  return { tIndex, wIndex, size: next };
}

/** θ from φ (σ not involved: T carries ratios to σ). */
export function thetaFromSd(dev: ProfiledDeviance, layout: SdLayout, phi: ArrayLike<number>, out: Float64Array): void {
  dev.terms.forEach((t, s) => {
    const k = t.k;
    if (!t.term.correlated) {
      for (let j = 0; j < k; j++) out[t.thetaStart + j] = phi[layout.tIndex[s][j]];
      return;
    }
    const T = new Float64Array(k * k);
    for (let i = 0; i < k; i++) {
      let norm = 1;
      for (let j = 0; j < i; j++) norm += phi[layout.wIndex[s][i][j]] ** 2;
      norm = Math.sqrt(norm);
      const ti = phi[layout.tIndex[s][i]];
      for (let j = 0; j < i; j++) T[i * k + j] = (ti * phi[layout.wIndex[s][i][j]]) / norm;
      T[i * k + i] = ti / norm;
    }
    let idx = t.thetaStart;
    for (let j = 0; j < k; j++) for (let i = j; i < k; i++) out[idx++] = T[i * k + j];
  });
}

/** φ̂ from θ̂ and σ̂. */
export function sdFromTheta(dev: ProfiledDeviance, layout: SdLayout, theta: ArrayLike<number>, sigma: number): Float64Array {
  const phi = new Float64Array(layout.size);
  phi[0] = Math.log(sigma);
  dev.setTheta(theta);
  dev.terms.forEach((t, s) => {
    const T = dev.templates[s];
    const k = t.k;
    for (let i = 0; i < k; i++) {
      let norm = 0;
      for (let j = 0; j <= i; j++) norm += T[i * k + j] ** 2;
      norm = Math.sqrt(norm);
      phi[layout.tIndex[s][i]] = norm;
      if (t.term.correlated) {
        const diag = T[i * k + i];
        for (let j = 0; j < i; j++) phi[layout.wIndex[s][i][j]] = diag > 0 ? T[i * k + j] / diag : 0;
      }
    }
  });
  return phi;
}

/** Which variance parameter to profile. */
export type VarianceTarget =
  | { kind: 'residual' }
  | { kind: 'sd'; term: number; effect: number }
  | { kind: 'ratio'; term: number; effect: number };

const LOG_SIGMA_RANGE = 25;
const T_MAX = 1e4;
const W_MAX = 1e4;

/**
 * D(v) for one variance target: the criterion minimised over every other variance parameter
 * (β and, for a ratio, σ² profiled analytically). Warm-started from the previous minimiser.
 */
function varianceProfile(ctx: InferenceContext, target: VarianceTarget) {
  const dev = ctx.dev;
  const layout = sdLayout(dev);
  const sigmaHat = Math.sqrt(ctx.sigma2);
  const phiHat = sdFromTheta(dev, layout, ctx.theta, sigmaHat);
  const fixedIndex = target.kind === 'residual' ? 0 : layout.tIndex[target.term][target.effect];
  const free: number[] = [];
  for (let i = 0; i < layout.size; i++) if (i !== fixedIndex && !(target.kind === 'ratio' && i === 0)) free.push(i);
  const lower = free.map((i) => (i === 0 ? phiHat[0] - LOG_SIGMA_RANGE : isT(layout, i) ? 0 : -W_MAX));
  const upper = free.map((i) => (i === 0 ? phiHat[0] + LOG_SIGMA_RANGE : isT(layout, i) ? T_MAX : W_MAX));
  const phi = Float64Array.from(phiHat);
  const theta = new Float64Array(dev.thetaLength);
  let v = 0;
  const criterion = (x: ArrayLike<number>): number => {
    for (let a = 0; a < free.length; a++) phi[free[a]] = x[a];
    if (target.kind === 'residual') phi[0] = Math.log(v);
    else if (target.kind === 'sd') phi[fixedIndex] = v / Math.exp(phi[0]);
    else phi[fixedIndex] = v;
    thetaFromSd(dev, layout, phi, theta);
    if (target.kind === 'ratio') return dev.evaluate(theta);
    const s = Math.exp(phi[0]);
    return unprofiledDeviance(dev, theta, s * s);
  };
  let start = free.map((i) => phiHat[i]);
  const minimise = (value: number): number => {
    v = value;
    if (free.length === 0) return criterion([]);
    if (free.length === 1) {
      // one free parameter: Brent, with t mapped from [0, 1) as in the main optimiser
      const i = free[0];
      if (i === 0) {
        const res = brentMinimise((x) => criterion([x]), lower[0], upper[0], { tolerance: 1e-10 });
        start = [res.x];
        return res.value;
      }
      const res = brentMinimise((u) => criterion([u / (1 - u)]), 0, T_MAX / (1 + T_MAX), { tolerance: 1e-11 });
      start = [res.x / (1 - res.x)];
      return res.value;
    }
    const f = (x: Float64Array) => criterion(x);
    // tight tolerances: the root search differences these minima
    const tol = { fTolerance: 1e-10, xTolerance: 1e-7 };
    let res = nelderMeadBounded(f, start, lower, upper, { step: 0.2, ...tol });
    const again = nelderMeadBounded(f, res.x, lower, upper, { step: 0.02, ...tol });
    if (again.value <= res.value) res = again;
    start = Array.from(res.x);
    return res.value;
  };
  const estimate = target.kind === 'residual' ? sigmaHat
    : target.kind === 'sd' ? sigmaHat * phiHat[fixedIndex] : phiHat[fixedIndex];
  return { minimise, estimate, reset: () => { start = free.map((i) => phiHat[i]); } };
}

function isT(layout: SdLayout, i: number): boolean {
  return layout.tIndex.some((row) => row.includes(i));
}

/** Profile interval for one variance target on the SD (or SD-ratio) scale. */
export function profileVariance(ctx: InferenceContext, target: VarianceTarget, level: number, label: string): ProfileInterval {
  const z = profileCutoff(level);
  const prof = varianceProfile(ctx, target);
  const dHat = target.kind === 'ratio' ? ctx.dev.evaluate(ctx.theta) : unprofiledDeviance(ctx.dev, ctx.theta, ctx.sigma2);
  const est = prof.estimate;
  let side = 0;
  const zeta = (v: number): number => {
    if (v === est) return 0;
    // each direction starts from the estimate, not from the other direction's last optimum
    const here = Math.sign(v - est);
    if (here !== side) { prof.reset(); side = here; }
    const d = Math.max(0, prof.minimise(v) - dHat);
    return here * Math.sqrt(d);
  };
  // starting step: a fifth of the estimate; for a zero estimate a fifth of the residual SD (or 0.2 for a ratio)
  const scale = est > 0 ? 0.2 * est : target.kind === 'ratio' ? 0.2 : 0.2 * Math.sqrt(ctx.sigma2);
  const out = profileLimits(zeta, est, scale, z, true, label);
  ctx.dev.factor(ctx.theta);
  return out;
}

/** The targets for every variance component row of a fit, in the design's term order, then the residual. */
export function varianceTargets(ctx: InferenceContext): { target: VarianceTarget; label: string; factor: string; term: string }[] {
  const out: { target: VarianceTarget; label: string; factor: string; term: string }[] = [];
  const layoutOf = new Map(ctx.dev.terms.map((t, s) => [t.term, s]));
  for (const term of ctx.design.random) {
    const s = layoutOf.get(term)!;
    term.terms.forEach((name, i) => out.push({
      target: { kind: 'sd', term: s, effect: i }, label: `sd(${term.factor}${name === 'intercept' ? '' : `:${name}`})`, factor: term.factor, term: name,
    }));
  }
  out.push({ target: { kind: 'residual' }, label: 'sd(residual)', factor: 'residual', term: '' });
  return out;
}
