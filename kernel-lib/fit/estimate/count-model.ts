/**
 * The estimate step for count and detection responses (Poisson, binomial, negative binomial):
 * maximum likelihood, exact for a GLM (no random terms: IRLS), otherwise with the marginal
 * likelihood integrated by the Laplace approximation (any grouping structure) or adaptive
 * Gauss-Hermite quadrature (one grouping factor with a random intercept).
 *
 * Optimisation, in two stages (Pinheiro and Bates 1995, J. Comput. Graph. Stat. 4:12, §4, on
 * maximising the approximated likelihood; the first stage is the penalised quasi-likelihood fit of
 * Breslow and Clayton 1993, J. Am. Stat. Assoc. 88:9):
 *  1. over θ alone, with β and the modes u solved jointly by penalised IRLS at each θ. Cheap and
 *     close, but not the maximum of the approximated likelihood, because β then ignores the
 *     log-determinant term;
 *  2. over (θ, β, log k) jointly on the approximated likelihood itself, by bounded Nelder-Mead,
 *     starting from stage 1, with β measured in stage-1 standard errors so that one step size
 *     suits every coordinate. Only u is solved inside.
 * Random-effect SDs below BOUNDARY_TOLERANCE are tried at exactly zero (a singular fit, equal to
 * the GLM), as in the normal engine. The aggregation k of the negative binomial is estimated by
 * ML with the other parameters (Brent on log k for a GLM).
 */
import type { DesignMatrices } from '../../data/design-matrices';
import { aliasingFromCrossProducts, restrictColumns } from '../aliasing';
import { brentMinimise } from '../../numeric/brent';
import { nelderMeadBounded } from '../../numeric/nelder-mead';
import { GlmResponse, type CountFamily } from './glm-response';
import { GlmIrls } from './glm-irls';
import { LaplaceGeneral } from './laplace-general';
import { OneInterceptQuadrature } from './quadrature-one-intercept';
import { conditionalVarianceFactor, type ProfiledDeviance } from '../profiled-deviance';

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
  /** Column visiting order for aliasing detection. */
  aliasPriority?: number[];
}

export interface CountEstimate {
  family: CountFamily;
  link: 'log' | 'logit';
  integration: Integration | 'exact';
  nodes: number;
  estimable: number[];
  aliased: number[];
  /** XᵀX of the full design (p × p), for explaining aliased columns. */
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
  /** Term layout for reporting SDs and modes (null for a GLM). */
  layout: ProfiledDeviance | null;
  /** Numerical notes (e.g. k at the edge of its range). */
  warnings: string[];
  /** Pearson χ² = Σ (y − μ)² / V(μ) at the fitted means. */
  pearsonChi2: number;
  /** n − (estimable fixed effects + covariance parameters + k). */
  residualDf: number;
}

/** Fit a count or detection model to design matrices. Never throws for numerical trouble. */
export function estimateCountModel(full: DesignMatrices, options: CountFitOptions): CountEstimate {
  const family = options.family;
  const n = full.n;
  const offset = options.offset ?? new Float64Array(n);
  const xtx = new Float64Array(full.p * full.p);
  for (let i = 0; i < n; i++) {
    for (let a = 0; a < full.p; a++) for (let b = 0; b <= a; b++) xtx[a * full.p + b] += full.X[i * full.p + a] * full.X[i * full.p + b];
  }
  for (let a = 0; a < full.p; a++) for (let b = a + 1; b < full.p; b++) xtx[a * full.p + b] = xtx[b * full.p + a];
  const alias = aliasingFromCrossProducts(xtx, full.p, full.p, options.aliasPriority);
  const design = restrictColumns(full, alias.estimable);
  const p = design.p;
  const response = new GlmResponse(family, n, options.trials);
  response.setResponse(design.y);
  const nb = family === 'negative-binomial';
  const kFixed = options.aggregation;
  const estimateK = nb && kFixed === undefined;
  const glm = new GlmIrls(design.X, p, offset, response);

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
      ...base, integration: 'exact', nodes: 0, beta: fitGlm.beta, cov: fitGlm.cov, theta: new Float64Array(0),
      aggregation: nb ? k : NaN, logLik: fitGlm.logLik, converged: fitGlm.converged, singular: false, reason,
      evaluations: glmEvaluations, eta, mu, modes: new Float64Array(0), modeSds: new Float64Array(0), layout: null, warnings: kWarning(estimateK, k),
      pearsonChi2: pearson(response, mu, k), residualDf: n - p - kParams,
    };
  }

  const integration: Integration = options.integration ?? 'laplace';
  const nodes = integration === 'quadrature' ? options.nodes ?? 9 : 1;
  const laplace = new LaplaceGeneral(design, offset, response);
  const layout = laplace.layout;
  const d = layout.thetaLength;
  const oneIntercept = design.random.length === 1 && design.random[0].terms.length === 1;
  const quad = oneIntercept ? new OneInterceptQuadrature(design.X, p, offset, response, design.random[0]) : null;
  let evaluations = glmEvaluations;

  // stage 1: θ with (β, u) by joint penalised IRLS
  const restart = (): void => {
    if (quad) { quad.beta.set(fitGlm.beta); quad.reset(); } else laplace.reset(fitGlm.beta);
  };
  restart();
  const stage1 = (theta: Float64Array): number => {
    evaluations++;
    const v = quad ? quad.jointLaplace(theta[0], k) : laplace.solve(theta, true, k);
    if (!Number.isFinite(v)) restart();
    return v;
  };
  const thetaFixed = options.theta ? Float64Array.from(options.theta) : null;
  let theta = thetaFixed ? Float64Array.from(thetaFixed) : layout.initialTheta();
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
  const beta1 = Float64Array.from(quad ? quad.beta : laplace.beta);
  const sdScratch = new Float64Array(quad ? quad.m : 0);
  const cov1 = quad ? quad.fixedCovariance(theta[0], beta1, k, sdScratch) : laplace.fixedCovariance(theta, k);
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
    if (quad) return quad.deviance(thetaWork[0], betaWork, kk, nodes);
    for (let a = 0; a < p; a++) laplace.beta[a] = betaWork[a];
    const v = laplace.solve(thetaWork, false, kk);
    return v;
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
  let cov: Float64Array;
  let eta: Float64Array;
  let modes: Float64Array;
  let modeSds: Float64Array;
  if (quad) {
    modeSds = new Float64Array(quad.m);
    modes = Float64Array.from(quad.modes, (u) => theta[0] * u);
    cov = quad.fixedCovariance(theta[0], beta, k, modeSds);
    eta = quad.predictor(theta[0], beta);
    layout.setTheta(theta);
  } else {
    laplace.reset(beta);
    laplace.solve(theta, false, k);
    for (let a = 0; a < p; a++) laplace.beta[a] = beta[a];
    cov = laplace.fixedCovariance(theta, k);
    eta = Float64Array.from(laplace.eta);
    modes = Float64Array.from(laplace.b);
    modeSds = conditionalSds(laplace, layout);
  }
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
