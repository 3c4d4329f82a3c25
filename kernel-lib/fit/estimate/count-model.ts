/**
 * The estimate step for count and detection responses (Poisson, binomial, negative binomial):
 * maximum likelihood, exact for a GLM (no random terms: IRLS), otherwise with the marginal
 * likelihood integrated by the Laplace approximation (any grouping structure) or adaptive
 * Gauss-Hermite quadrature (one grouping factor with a random intercept).
 *
 * One random intercept (Laplace or quadrature): the approximated deviance and its exact gradient in
 * (θ, β) come from ./quadrature-one-intercept.ts (the group modes solved inside by Newton's method),
 * and (θ, β, log k) are optimised jointly by Newton's method with a finite-difference Hessian
 * (numeric/newton.ts), started from the GLM and a moment estimate of θ. A few dozen deviance
 * evaluations per fit.
 *
 * Other structures, in two stages (Pinheiro and Bates 1995, J. Comput. Graph. Stat. 4:12, §4, on
 * maximising the approximated likelihood; the first stage is the penalised quasi-likelihood fit of
 * Breslow and Clayton 1993, J. Am. Stat. Assoc. 88:9):
 *  1. over θ alone, with β and the modes u solved jointly by penalised IRLS at each θ. Cheap and
 *     close, but not the maximum of the approximated likelihood, because β then ignores the
 *     log-determinant term;
 *  2. over (θ, β, log k) jointly on the approximated likelihood itself, by bounded Nelder-Mead,
 *     starting from stage 1, with β measured in stage-1 standard errors so that one step size
 *     suits every coordinate. Only u is solved inside.
 * Random-effect SDs below COUNT_BOUNDARY_TOLERANCE are tried at exactly zero (a singular fit, equal
 * to the GLM), as in the normal engine. The aggregation k of the negative binomial is estimated by
 * ML with the other parameters (Brent on log k for a GLM).
 *
 * Everything that does not depend on the response (X's cross-products and aliasing, the restricted
 * design, the GLM and quadrature workspaces) is kept per design object, so refitting a design with a
 * new response (a study replicate, a bootstrap resample) allocates only the result.
 */
import type { DesignMatrices } from '../../data/design-matrices';
import { aliasingFromCrossProducts, restrictColumns } from '../aliasing';
import { brentMinimise } from '../../numeric/brent';
import { nelderMeadBounded } from '../../numeric/nelder-mead';
import { newtonMinimise } from '../../numeric/newton';
import { GlmResponse, type CountFamily } from './glm-response';
import { GlmIrls, type GlmOutcome } from './glm-irls';
import { LaplaceGeneral } from './laplace-general';
import { OneInterceptQuadrature } from './quadrature-one-intercept';
import { conditionalVarianceFactor, ProfiledDeviance } from '../profiled-deviance';

export type Integration = 'laplace' | 'quadrature';

/** θ (a random-effect SD on the link scale) below this counts as on the boundary (common practice, no source). */
const COUNT_BOUNDARY_TOLERANCE = 1e-4;
/** Largest random-effect SD searched on the link scale (e^20 between groups is far beyond any survey). */
const THETA_MAX = 20;
/** Range searched for log k. */
const LOG_K_MIN = Math.log(1e-3);
const LOG_K_MAX = Math.log(1e6);

export interface CountFitOptions {
  family: CountFamily;
  /** Binomial trials per observation (default 1). */
  trials?: Float64Array;
  /** Added to the linear predictor (e.g. log effort). Default 0. */
  offset?: Float64Array;
  /** Default 'laplace'. 'quadrature' needs exactly one random term with an intercept only. */
  integration?: Integration;
  /** Quadrature nodes (default 9); 1 is the Laplace approximation. */
  nodes?: number;
  /** Hold the NB aggregation k at this value instead of estimating it. */
  aggregation?: number;
  /** Hold θ at this value (engine order) and estimate β (and k) only. */
  theta?: ArrayLike<number>;
  /** Column visiting order for aliasing detection (EstimateOptions.priority). */
  priority?: number[];
  /** Starting θ (engine order), as EstimateOptions.start. */
  start?: ArrayLike<number>;
}

export interface CountEstimate {
  family: CountFamily;
  link: 'log' | 'logit';
  integration: Integration | 'exact';
  nodes: number;
  estimable: number[];
  aliased: number[];
  /** XᵀX of the full design (p × p), for explaining aliased columns (shared by the fits of one design revision: read only). */
  xtx: Float64Array;
  /** Estimates of the estimable columns, in `estimable` order. */
  beta: Float64Array;
  /** Their covariance (estimable × estimable, row-major). */
  cov: Float64Array;
  /** Relative covariance parameters in the engine's term order (SDs on the link scale for intercepts). */
  theta: Float64Array;
  /** NB aggregation k (NaN for other families). */
  aggregation: number;
  logLik: number;
  converged: boolean;
  singular: boolean;
  reason: string;
  evaluations: number;
  /** Linear predictor (with offset and modes) and fitted mean per observation. */
  eta: Float64Array;
  mu: Float64Array;
  /** Conditional modes b (engine term order) and their conditional SDs. */
  modes: Float64Array;
  modeSds: Float64Array;
  /** Term layout for reporting SDs and modes (null for a GLM; built on first use for one random intercept). */
  layout: ProfiledDeviance | null;
  /** Numerical notes (e.g. k at the edge of its range). */
  warnings: string[];
  /** Pearson χ² = Σ (y − μ)² / V(μ) at the fitted means. */
  pearsonChi2: number;
  /** n − (estimable fixed effects + covariance parameters + k). */
  residualDf: number;
}

/** What a count fit keeps per design object: everything that does not depend on the response. */
interface CountWorkspace {
  family: CountFamily;
  priority: number[] | undefined;
  n: number;
  /** The design's revision the workspace was built or refreshed for. */
  revision: number;
  xtx: Float64Array;
  alias: ReturnType<typeof aliasingFromCrossProducts>;
  design: DesignMatrices;
  offset: Float64Array;
  response: GlmResponse;
  glm: GlmIrls;
  quad: OneInterceptQuadrature | null;
  /** Per-observation scratch (GLM predictor, scores and weights for the starting θ). */
  eta: Float64Array;
  score: Float64Array;
  weight: Float64Array;
  /** Per-level sums of the same (one random intercept). */
  levelScore: Float64Array;
  levelWeight: Float64Array;
  /** Term layout for reporting (built on first use: a one-intercept fit does not need it). */
  layout: ProfiledDeviance | null;
  inUse: boolean;
}

const workspaces = new WeakMap<DesignMatrices, CountWorkspace>();

function samePriority(a: number[] | undefined, b: number[] | undefined): boolean {
  if (a === undefined || b === undefined) return a === b;
  return a.length === b.length && a.every((v, i) => v === b[i]);
}

/** A design refilled in place (a study's design plan) carries a new revision; absent means never refilled. */
function revisionOf(design: DesignMatrices): number {
  return (design as { revision?: number }).revision ?? 0;
}

/** XᵀX of the full design (p × p, both triangles) into `out`. */
function crossProduct(full: DesignMatrices, out: Float64Array): void {
  const { n, p, X } = full;
  out.fill(0);
  for (let i = 0, r = 0; i < n; i++, r += p) {
    for (let a = 0; a < p; a++) for (let b = 0; b <= a; b++) out[a * p + b] += X[r + a] * X[r + b];
  }
  for (let a = 0; a < p; a++) for (let b = a + 1; b < p; b++) out[a * p + b] = out[b * p + a];
}

/**
 * The workspace kept for this design object when it matches (family, trials, offset, priority) and
 * is free; else a new one. A design refilled in place keeps its workspace when the shape and the
 * estimable columns stay the same (the GLM and quadrature steps read X, the offset and the random
 * term through the same arrays); only XᵀX and the groups are recomputed.
 */
function acquireWorkspace(full: DesignMatrices, options: CountFitOptions): CountWorkspace {
  const kept = workspaces.get(full);
  const family = options.family;
  const revision = revisionOf(full);
  if (
    kept && !kept.inUse && kept.family === family && kept.n === full.n && samePriority(kept.priority, options.priority)
  ) {
    if (kept.revision === revision) {
      loadOffsetAndTrials(kept, options);
      kept.inUse = true;
      return kept;
    }
    const sameShape = kept.design === full && kept.glm.X === full.X && kept.design.random.length === full.random.length &&
      (!kept.quad || (kept.quad.X === full.X && kept.quad.m === full.random[0].levels.length));
    if (sameShape) {
      // a new XᵀX array: results of earlier fits may still hold the old one
      const xtx = new Float64Array(full.p * full.p);
      crossProduct(full, xtx);
      const alias = aliasingFromCrossProducts(xtx, full.p, full.p, options.priority);
      if (alias.aliased.length === 0) {
        kept.xtx = xtx;
        kept.alias = alias;
        kept.revision = revision;
        loadOffsetAndTrials(kept, options);
        if (kept.quad) kept.quad.setGroups(full.random[0]);
        kept.layout = null;
        kept.inUse = true;
        return kept;
      }
    }
  }
  const n = full.n;
  const xtx = new Float64Array(full.p * full.p);
  crossProduct(full, xtx);
  const alias = aliasingFromCrossProducts(xtx, full.p, full.p, options.priority);
  const design = restrictColumns(full, alias.estimable);
  const offset = new Float64Array(n);
  const response = new GlmResponse(family, n);
  const oneIntercept = design.random.length === 1 && design.random[0].terms.length === 1;
  const ws: CountWorkspace = {
    family, priority: options.priority ? options.priority.slice() : undefined, n, revision,
    xtx, alias, design, offset, response, glm: new GlmIrls(design.X, design.p, offset, response),
    quad: oneIntercept ? new OneInterceptQuadrature(design.X, design.p, offset, response, design.random[0]) : null,
    eta: new Float64Array(n), score: new Float64Array(n), weight: new Float64Array(n),
    levelScore: new Float64Array(oneIntercept ? design.random[0].levels.length : 0),
    levelWeight: new Float64Array(oneIntercept ? design.random[0].levels.length : 0), layout: null, inUse: true,
  };
  loadOffsetAndTrials(ws, options);
  // a busy workspace (a fit inside a fit of the same design) stays kept; the new one is used once
  if (!kept || !kept.inUse) workspaces.set(full, ws);
  return ws;
}

/** The fit's offset (0 when absent) and binomial trials (1 when absent) into the workspace's own arrays. */
function loadOffsetAndTrials(ws: CountWorkspace, options: CountFitOptions): void {
  if (options.offset) ws.offset.set(options.offset);
  else ws.offset.fill(0);
  if (options.trials) ws.response.trials.set(options.trials);
  else ws.response.trials.fill(1);
}

/** Fit a count or detection model to design matrices. Never throws for numerical trouble. */
export function estimateCountModel(full: DesignMatrices, options: CountFitOptions): CountEstimate {
  const ws = acquireWorkspace(full, options);
  try {
    return estimateWith(ws, full, options);
  } finally {
    ws.inUse = false;
  }
}

function estimateWith(ws: CountWorkspace, full: DesignMatrices, options: CountFitOptions): CountEstimate {
  const family = options.family;
  const n = full.n;
  const { alias, design, response, glm, xtx } = ws;
  const p = design.p;
  response.setResponse(full.y);
  const nb = family === 'negative-binomial';
  const kFixed = options.aggregation;
  const estimateK = nb && kFixed === undefined;

  // the GLM: exact, and the start of a mixed model
  let k = nb ? kFixed ?? 1 : 1;
  let fitGlm = glm.fit(k);
  let glmEvaluations = fitGlm.iterations;
  if (estimateK) {
    let warm = fitGlm.beta;
    const res = brentMinimise((lk) => {
      const r = glm.fit(Math.exp(lk), warm);
      glmEvaluations += r.iterations;
      if (r.converged) warm = r.beta;
      return -r.logLik;
    }, LOG_K_MIN, LOG_K_MAX, { tolerance: 1e-9 });
    k = Math.exp(res.x);
    fitGlm = glm.fit(k, warm);
  }
  const link = family === 'binomial' ? 'logit' : 'log';
  const base = {
    family, link: link as 'log' | 'logit', estimable: alias.estimable, aliased: alias.aliased, xtx,
  };
  if (design.random.length === 0) {
    const eta = new Float64Array(n);
    glm.linearPredictor(fitGlm.beta, eta);
    const mu = new Float64Array(n);
    response.kernel(eta, k, 0, n, mu, null, null, null);
    const kParams = estimateK ? 1 : 0;
    const reason = fitGlm.reason;
    return {
      ...base, integration: 'exact', nodes: 0, beta: fitGlm.beta, cov: glm.covariance(fitGlm.beta, k), theta: new Float64Array(0),
      aggregation: nb ? k : NaN, logLik: fitGlm.logLik, converged: fitGlm.converged, singular: false, reason,
      evaluations: glmEvaluations, eta, mu, modes: new Float64Array(0), modeSds: new Float64Array(0), layout: null, warnings: kWarning(estimateK, k),
      pearsonChi2: pearson(response, mu, k), residualDf: n - p - kParams,
    };
  }
  const integration: Integration = options.integration ?? 'laplace';
  const nodes = integration === 'quadrature' ? options.nodes ?? 9 : 1;
  if (ws.quad) return fitOneIntercept(ws, ws.quad, base, options, fitGlm, k, estimateK, glmEvaluations, integration, nodes);
  return fitGeneral(ws, base, options, fitGlm, k, estimateK, glmEvaluations, integration, nodes);
}

type CountBase = Pick<CountEstimate, 'family' | 'link' | 'estimable' | 'aliased' | 'xtx'>;

/**
 * One grouping factor with a random intercept: Newton's method on (θ, β[, log k]) with the exact
 * gradient of the approximated deviance (Laplace or adaptive quadrature). The deviance is even in θ,
 * so θ runs over the real line and |θ| is reported; an SD that ends below the boundary tolerance is
 * replaced by exactly zero (the GLM) when that is no worse.
 */
function fitOneIntercept(
  ws: CountWorkspace, quad: OneInterceptQuadrature, base: CountBase, options: CountFitOptions, fitGlm: GlmOutcome,
  kGlm: number, estimateK: boolean, glmEvaluations: number, integration: Integration, nodes: number,
): CountEstimate {
  const { design, response } = ws;
  const { n, p } = design;
  const nb = options.family === 'negative-binomial';
  const thetaFixed = options.theta !== undefined;
  const dTheta = thetaFixed ? 0 : 1;
  const dim = dTheta + p + (estimateK ? 1 : 0);
  let evaluations = glmEvaluations;
  quad.reset();
  const gradBuf = new Float64Array(1 + p);
  const betaWork = new Float64Array(p);
  let thetaNow = thetaFixed ? options.theta![0] : 0;
  let nodesNow = nodes;
  const unpack = (phi: ArrayLike<number>): number => {
    if (!thetaFixed) thetaNow = phi[0];
    for (let a = 0; a < p; a++) betaWork[a] = phi[dTheta + a];
    return estimateK ? Math.exp(phi[dim - 1]) : kGlm;
  };
  const fg = (phi: Float64Array, g: Float64Array): number => {
    evaluations++;
    const kk = unpack(phi);
    const v = quad.deviance(thetaNow, betaWork, kk, nodesNow, gradBuf);
    if (!thetaFixed) g[0] = gradBuf[0];
    for (let a = 0; a < p; a++) g[dTheta + a] = gradBuf[1 + a];
    if (estimateK) {
      // log k by a central difference (the gradient in (θ, β) is exact)
      const h = 1e-5;
      const lk = phi[dim - 1];
      evaluations += 2;
      g[dim - 1] = (quad.deviance(thetaNow, betaWork, Math.exp(lk + h), nodesNow) - quad.deviance(thetaNow, betaWork, Math.exp(lk - h), nodesNow)) / (2 * h);
    }
    return v;
  };
  const start = new Float64Array(dim);
  const lower = new Float64Array(dim);
  const upper = new Float64Array(dim);
  if (!thetaFixed) {
    start[0] = options.start && options.start.length === 1 && options.start[0] > 0 ? options.start[0] : momentTheta(ws, fitGlm.beta, kGlm);
    lower[0] = -THETA_MAX;
    upper[0] = THETA_MAX;
  }
  for (let a = 0; a < p; a++) { start[dTheta + a] = fitGlm.beta[a]; lower[dTheta + a] = -1e4; upper[dTheta + a] = 1e4; }
  if (estimateK) { start[dim - 1] = Math.log(kGlm); lower[dim - 1] = LOG_K_MIN; upper[dim - 1] = LOG_K_MAX; }
  // quadrature: first the Laplace optimum (a few cheap evaluations), then quadrature from there,
  // starting from the Laplace Hessian instead of differencing the costlier deviance
  let res: ReturnType<typeof newtonMinimise>;
  if (nodes > 1) {
    const hessian = new Float64Array(dim * dim);
    nodesNow = 1;
    const laplace = newtonMinimise(fg, start, lower, upper, { hessianOut: hessian });
    nodesNow = nodes;
    res = laplace.converged && Number.isFinite(laplace.value)
      ? newtonMinimise(fg, laplace.x, lower, upper, { hessianStart: hessian })
      : newtonMinimise(fg, start, lower, upper);
  } else {
    res = newtonMinimise(fg, start, lower, upper);
  }
  let converged = res.converged;
  let reason = res.reason;
  let k = unpack(res.x);
  let theta = Math.abs(thetaNow);
  const beta = Float64Array.from(betaWork);
  let deviance = res.value;
  // the boundary: at θ = 0 the approximation is exact and its maximum is the GLM
  const glmDeviance = -2 * fitGlm.logLik;
  if (!thetaFixed && fitGlm.converged && (theta < COUNT_BOUNDARY_TOLERANCE || !(deviance < glmDeviance)) && glmDeviance <= deviance + 1e-8) {
    theta = 0;
    beta.set(fitGlm.beta);
    k = kGlm;
    converged = true;
    reason = '';
  }
  // modes, covariance and fitted values at the estimate
  evaluations++;
  deviance = quad.deviance(theta, beta, k, nodes);
  if (!Number.isFinite(deviance)) {
    converged = false;
    reason = reason || 'the approximated likelihood could not be evaluated';
    deviance = NaN;
  }
  const modeSds = new Float64Array(quad.m);
  const modes = Float64Array.from(quad.modes, (u) => theta * u);
  const cov = quad.fixedCovariance(theta, beta, k, modeSds);
  const eta = quad.predictor(theta, beta);
  const mu = new Float64Array(n);
  response.kernel(eta, k, 0, n, mu, null, null, null);
  return {
    ...base, integration, nodes, beta, cov, theta: Float64Array.of(theta), aggregation: nb ? k : NaN, logLik: -deviance / 2, converged,
    singular: theta < COUNT_BOUNDARY_TOLERANCE, reason, evaluations, eta, mu, modes, modeSds,
    get layout(): ProfiledDeviance {
      if (!ws.layout) ws.layout = new ProfiledDeviance({ ...design, p: 0, X: new Float64Array(0), fixedNames: [], roles: [] }, false);
      return ws.layout;
    },
    warnings: kWarning(estimateK, k), pearsonChi2: pearson(response, mu, k), residualDf: n - p - dTheta - (estimateK ? 1 : 0),
  };
}

/**
 * Starting θ from the GLM: one Newton step of each group's effect from zero, b_j = Σ s z / Σ w z²,
 * whose spread beyond its sampling variance 1/Σ w z² estimates θ² (a method-of-moments start,
 * common practice, no source); kept within [0.2, 5] so that Newton's method starts away from the
 * flat point θ = 0.
 */
function momentTheta(ws: CountWorkspace, beta: Float64Array, k: number): number {
  const { eta, score, weight, response, glm } = ws;
  const term = ws.design.random[0];
  const m = term.levels.length;
  glm.linearPredictor(beta, eta);
  response.kernel(eta, k, 0, ws.n, null, score, weight, null);
  const { levelScore, levelWeight } = ws;
  levelScore.fill(0);
  levelWeight.fill(0);
  for (let i = 0; i < ws.n; i++) {
    const z = term.values[i];
    levelScore[term.index[i]] += score[i] * z;
    levelWeight[term.index[i]] += weight[i] * z * z;
  }
  let sumB2 = 0;
  let sumVar = 0;
  let groups = 0;
  for (let j = 0; j < m; j++) {
    const w = levelWeight[j];
    if (!(w > 0)) continue;
    const b = levelScore[j] / w;
    sumB2 += b * b;
    sumVar += 1 / w;
    groups++;
  }
  const t2 = groups > 0 ? (sumB2 - sumVar) / groups : 0;
  const t = Math.sqrt(Math.max(t2, 0));
  return Number.isFinite(t) ? Math.min(5, Math.max(0.2, t)) : 0.2;
}

/** Any other grouping structure, by the Laplace approximation: the two stages described at the top. */
function fitGeneral(
  ws: CountWorkspace, base: CountBase, options: CountFitOptions, fitGlm: GlmOutcome,
  kStart: number, estimateK: boolean, glmEvaluations: number, integration: Integration, nodes: number,
): CountEstimate {
  const { design, offset, response } = ws;
  const { n, p } = design;
  const nb = options.family === 'negative-binomial';
  let k = kStart;
  const laplace = new LaplaceGeneral(design, offset, response);
  const layout = laplace.layout;
  const d = layout.thetaLength;
  let evaluations = glmEvaluations;

  // stage 1: θ with (β, u) by joint penalised IRLS
  const restart = (): void => laplace.reset(fitGlm.beta);
  restart();
  const stage1 = (theta: Float64Array): number => {
    evaluations++;
    const v = laplace.solve(theta, true, k);
    if (!Number.isFinite(v)) restart();
    return v;
  };
  const thetaFixed = options.theta ? Float64Array.from(options.theta) : null;
  let theta = thetaFixed ? Float64Array.from(thetaFixed) : options.start && options.start.length === d ? Float64Array.from(options.start) : layout.initialTheta();
  if (!thetaFixed) {
    if (d === 1) {
      const buf = new Float64Array(1);
      const tMax = THETA_MAX / (1 + THETA_MAX);
      const res = brentMinimise((t) => { buf[0] = t / (1 - t); return stage1(buf); }, 0, tMax, { tolerance: 1e-7 });
      theta = Float64Array.of(res.x / (1 - res.x));
    } else {
      const lower = Float64Array.from(layout.lowerBounds, (v) => (Number.isFinite(v) ? v : -THETA_MAX));
      const upper = new Float64Array(d).fill(THETA_MAX);
      const res = nelderMeadBounded(stage1, theta, lower, upper, { step: 0.25, fTolerance: 1e-6, xTolerance: 1e-4 });
      theta = res.x;
    }
  }
  stage1(theta);
  const beta1 = Float64Array.from(laplace.beta);
  const cov1 = laplace.fixedCovariance(theta, k);
  const scale = new Float64Array(p);
  for (let a = 0; a < p; a++) {
    const se = Math.sqrt(cov1[a * p + a]);
    scale[a] = Number.isFinite(se) && se > 0 ? se : 1;
  }

  // stage 2: (θ, β, log k) on the approximated likelihood
  const dTheta = thetaFixed ? 0 : d;
  const dim = dTheta + p + (estimateK ? 1 : 0);
  const thetaWork = Float64Array.from(theta);
  const betaWork = new Float64Array(p);
  const unpack = (phi: ArrayLike<number>): number => {
    for (let s = 0; s < dTheta; s++) thetaWork[s] = phi[s];
    for (let a = 0; a < p; a++) betaWork[a] = beta1[a] + scale[a] * phi[dTheta + a];
    return estimateK ? Math.exp(phi[dim - 1]) : k;
  };
  const objective = (phi: Float64Array): number => {
    evaluations++;
    const kk = unpack(phi);
    for (let a = 0; a < p; a++) laplace.beta[a] = betaWork[a];
    return laplace.solve(thetaWork, false, kk);
  };
  const start = new Float64Array(dim);
  const lower = new Float64Array(dim);
  const upper = new Float64Array(dim);
  for (let s = 0; s < dTheta; s++) {
    start[s] = theta[s];
    lower[s] = Number.isFinite(layout.lowerBounds[s]) ? layout.lowerBounds[s] : -THETA_MAX;
    upper[s] = THETA_MAX;
  }
  for (let a = 0; a < p; a++) { lower[dTheta + a] = -1e4; upper[dTheta + a] = 1e4; }
  if (estimateK) { start[dim - 1] = Math.log(k); lower[dim - 1] = LOG_K_MIN; upper[dim - 1] = LOG_K_MAX; }
  let res = nelderMeadBounded(objective, start, lower, upper, { step: 0.2, fTolerance: 1e-5, xTolerance: 1e-2 });
  let converged = res.converged;
  let reason = res.reason;
  // snap near-zero SDs to exactly zero when that is no worse, then polish the rest there
  let snapped = false;
  for (let s = 0; s < dTheta; s++) {
    if (layout.lowerBounds[s] === 0 && res.x[s] > 0 && res.x[s] < COUNT_BOUNDARY_TOLERANCE) {
      lower[s] = 0;
      upper[s] = 0;
      snapped = true;
    }
  }
  const again = nelderMeadBounded(objective, res.x, lower, upper, { step: 0.01, fTolerance: 1e-9, xTolerance: 1e-5 });
  if (again.value <= res.value + (snapped ? 1e-8 : 0)) {
    res = again;
    converged = again.converged;
    reason = again.reason;
  }
  let deviance = objective(res.x);
  k = unpack(res.x);
  theta = Float64Array.from(thetaWork);
  const beta = Float64Array.from(betaWork);
  if (!Number.isFinite(deviance)) {
    converged = false;
    reason = laplace.lastFailure || 'the approximated likelihood could not be evaluated';
  }

  // modes, covariance and fitted values at the estimate (the modes of the last evaluation)
  laplace.reset(beta);
  laplace.solve(theta, false, k);
  for (let a = 0; a < p; a++) laplace.beta[a] = beta[a];
  const cov = laplace.fixedCovariance(theta, k);
  const eta = Float64Array.from(laplace.eta);
  const modes = Float64Array.from(laplace.b);
  const modeSds = conditionalSds(laplace, layout);
  const mu = new Float64Array(n);
  response.kernel(eta, k, 0, n, mu, null, null, null);
  let singular = false;
  for (const t of layout.terms) {
    const T = layout.templates[layout.terms.indexOf(t)];
    for (let i = 0; i < t.k; i++) if (Math.abs(T[i * t.k + i]) < COUNT_BOUNDARY_TOLERANCE) singular = true;
  }
  if (!Number.isFinite(deviance)) deviance = NaN;
  return {
    ...base, integration, nodes, beta, cov, theta, aggregation: nb ? k : NaN, logLik: -deviance / 2, converged, singular, reason,
    evaluations, eta, mu, modes, modeSds, layout, warnings: kWarning(estimateK, k), pearsonChi2: pearson(response, mu, k),
    residualDf: n - p - dTheta - (estimateK ? 1 : 0),
  };
}

function kWarning(estimated: boolean, k: number): string[] {
  if (!estimated) return [];
  if (Math.log(k) > LOG_K_MAX - 1e-3) return ['aggregation k ran to its upper limit (10⁶): no variation beyond Poisson; the Poisson family gives the same fit'];
  if (Math.log(k) < LOG_K_MIN + 1e-3) return ['aggregation k ran to its lower limit (10⁻³): the counts are extremely clumped; check the data'];
  return [];
}

function pearson(response: GlmResponse, mu: Float64Array, k: number): number {
  let s = 0;
  for (let i = 0; i < response.n; i++) {
    const v = response.variance(mu[i], i, k);
    const r = response.y[i] - mu[i];
    if (v > 0) s += (r * r) / v;
  }
  return s;
}

/** Conditional SDs of b = Λu: sqrt(diag T A⁻¹ Tᵀ) per level, from the last weighted factorisation. */
function conditionalSds(laplace: LaplaceGeneral, layout: ProfiledDeviance): Float64Array {
  const out = new Float64Array(layout.q);
  const pd = laplace.last;
  if (!pd) return out.fill(NaN);
  const blocks = pd.inverseDiagonalBlocks();
  for (let s = 0; s < layout.terms.length; s++) {
    const t = layout.terms[s];
    const T = layout.templates[s];
    const k = t.k;
    const blk = blocks[s];
    for (let l = 0; l < t.m; l++) {
      for (let i = 0; i < k; i++) {
        out[t.start + l * k + i] = Math.sqrt(conditionalVarianceFactor(T, blk, l, k, i));
      }
    }
  }
  return out;
}
