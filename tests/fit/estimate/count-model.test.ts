/**
 * Count and detection fits (kernel-lib/fit/estimate/count-model) against outside references:
 * statsmodels GLM and discrete NegativeBinomial, and the marginal likelihood maximised with
 * scipy.integrate.quad (data/reference/counts, see make_count_reference.py), plus identities of
 * the Laplace approximation and adaptive quadrature checked against a brute-force integral
 * computed here.
 */
import { describe, expect, it } from 'vitest';
import { join } from 'path';
import { readCsvFile } from '../../../kernel-lib/data/csv';
import { estimateCountModel, type CountEstimate } from '../../../kernel-lib/fit/estimate/count-model';
import { GlmResponse, type CountFamily } from '../../../kernel-lib/fit/estimate/glm-response';
import { LaplaceGeneral } from '../../../kernel-lib/fit/estimate/laplace-general';
import { OneInterceptQuadrature } from '../../../kernel-lib/fit/estimate/quadrature-one-intercept';
import { logGamma } from '../../../kernel-lib/numeric/special';
import { COUNT_REFERENCE_DIR, countReference } from '../../helpers/count-reference';
import { handDesign, testRandom } from '../../helpers/simple-design';

interface Case {
  rows: Record<string, any[]>;
  design: ReturnType<typeof handDesign>;
  glmDesign: ReturnType<typeof handDesign>;
  offset?: Float64Array;
  trials?: Float64Array;
}

function loadCase(name: string, trialsColumn?: string, offsetColumn?: string): Case {
  const rows = readCsvFile(join(COUNT_REFERENCE_DIR, `${name}.csv`)) as unknown as Record<string, any[]>;
  const n = rows.y.length;
  const labels = [...new Set(rows.g.map(String))].sort();
  const index = rows.g.map((g: unknown) => labels.indexOf(String(g)));
  const X = rows.x.map((x: number) => [1, x]);
  const y = rows.y as number[];
  return {
    rows,
    design: handDesign(X, ['intercept', 'x'], y, [{ factor: 'g', index }]),
    glmDesign: handDesign(X, ['intercept', 'x'], y),
    offset: offsetColumn ? Float64Array.from(rows[offsetColumn], (v: number) => Math.log(v)) : undefined,
    trials: trialsColumn ? Float64Array.from(rows[trialsColumn]) : n ? undefined : undefined,
  };
}

const se = (fit: CountEstimate, a: number) => Math.sqrt(fit.cov[a * fit.beta.length + a]);
const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(1e-300, Math.abs(b));

interface GlmRef { fixed: { estimate: number; se: number }[]; llf: number; pearson_chi2: number }

function expectGlm(fit: CountEstimate, ref: GlmRef, digits = 1e-8) {
  ref.fixed.forEach((f, a) => {
    expect(rel(fit.beta[a], f.estimate)).toBeLessThan(digits);
    expect(rel(se(fit, a), f.se)).toBeLessThan(10 * digits);
  });
  expect(Math.abs(fit.logLik - ref.llf)).toBeLessThan(digits * Math.abs(ref.llf));
  expect(rel(fit.pearsonChi2, ref.pearson_chi2)).toBeLessThan(10 * digits);
}

const CASES: { name: string; family: CountFamily; trials?: string; offset?: string; k?: number }[] = [
  { name: 'poisson-groups', family: 'poisson', offset: 'effort' },
  { name: 'binomial-groups', family: 'binomial', trials: 'm' },
  { name: 'presence-groups', family: 'binomial' },
  { name: 'nb-groups', family: 'negative-binomial', k: 2 },
];

describe('GLM (no random term, and random-effect SD held at zero) equals statsmodels GLM', () => {
  for (const c of CASES) {
    it(`${c.name}: estimates, SEs, log-likelihood and Pearson χ²`, () => {
      // statsmodels GLM(..., family=<family>).fit(tol=1e-14); NB: family NegativeBinomial(alpha = 1/k = 0.5)
      const ref = countReference(c.name).glm as GlmRef;
      const data = loadCase(c.name, c.trials, c.offset);
      const opts = { family: c.family, trials: data.trials, offset: data.offset, aggregation: c.k };
      const glm = estimateCountModel(data.glmDesign, opts);
      expect(glm.integration).toBe('exact');
      expect(glm.converged).toBe(true);
      expectGlm(glm, ref);
      const zero = estimateCountModel(data.design, { ...opts, theta: [0] });
      expectGlm(zero, ref, 1e-6);
    });
  }
});

describe('negative binomial aggregation k by maximum likelihood', () => {
  it('equals statsmodels NegativeBinomial (nb2) ML: k = 1/alpha, β and the log-likelihood', () => {
    // statsmodels.discrete.discrete_model.NegativeBinomial(y, [1, x], loglike_method='nb2').fit(method='bfgs', gtol=1e-10)
    const ref = countReference('nb-groups').nb_ml;
    const data = loadCase('nb-groups');
    const fit = estimateCountModel(data.glmDesign, { family: 'negative-binomial' });
    expect(rel(fit.aggregation, ref.aggregation)).toBeLessThan(1e-4);
    ref.fixed.forEach((f: { estimate: number }, a: number) => expect(Math.abs(fit.beta[a] - f.estimate)).toBeLessThan(1e-5));
    expect(Math.abs(fit.logLik - ref.llf)).toBeLessThan(1e-7);
  });
});

describe('random intercept: adaptive quadrature reaches the marginal maximum likelihood', () => {
  const cases: { name: string; family: CountFamily; trials?: string; offset?: string; k?: number; key: string }[] = [
    { name: 'poisson-groups', family: 'poisson', offset: 'effort', key: 'marginal_ml' },
    { name: 'binomial-groups', family: 'binomial', trials: 'm', key: 'marginal_ml' },
    { name: 'nb-groups', family: 'negative-binomial', k: 2, key: 'marginal_ml_k2' },
  ];
  for (const c of cases) {
    it(`${c.name}: 25-node quadrature equals the scipy.integrate.quad maximum (β, SD, log-likelihood)`, () => {
      // make_count_reference.py: marginal log-likelihood by scipy.integrate.quad per group, maximised by Nelder-Mead
      const ref = countReference(c.name)[c.key];
      const data = loadCase(c.name, c.trials, c.offset);
      const fit = estimateCountModel(data.design, { family: c.family, trials: data.trials, offset: data.offset, aggregation: c.k, integration: 'quadrature', nodes: 25 });
      expect(fit.converged).toBe(true);
      ref.fixed.forEach((f: { estimate: number }, a: number) => expect(Math.abs(fit.beta[a] - f.estimate)).toBeLessThan(2e-5));
      expect(Math.abs(fit.theta[0] - ref.sd)).toBeLessThan(2e-5);
      expect(Math.abs(fit.logLik - ref.llf)).toBeLessThan(1e-7);
      // the Laplace fit is close but not equal (an approximation): within 0.05 in log-likelihood here
      const lap = estimateCountModel(data.design, { family: c.family, trials: data.trials, offset: data.offset, aggregation: c.k });
      expect(Math.abs(lap.logLik - ref.llf)).toBeLessThan(0.05);
      expect(lap.logLik).not.toBe(fit.logLik);
    });
  }
});

/**
 * Brute-force marginal log-likelihood of a one-intercept Poisson model, written here from the
 * definition: per group, the trapezoid rule on u ∈ [−12, 12] with 24,001 points of
 * Π Poisson(y | exp(f + θu)) φ(u) (the integrand is smooth and negligible beyond ±12).
 */
function bruteForcePoisson(y: number[], f: number[], group: number[], m: number, theta: number): number {
  let total = 0;
  const h = 24 / 24000;
  for (let j = 0; j < m; j++) {
    const rows = group.map((g, i) => (g === j ? i : -1)).filter((i) => i >= 0);
    const logs: number[] = [];
    for (let s = 0; s <= 24000; s++) {
      const u = -12 + s * h;
      let l = -0.5 * u * u - 0.5 * Math.log(2 * Math.PI);
      for (const i of rows) {
        const eta = f[i] + theta * u;
        l += y[i] * eta - Math.exp(eta) - logGamma(y[i] + 1);
      }
      logs.push(l);
    }
    const top = Math.max(...logs);
    let sum = 0;
    logs.forEach((l, s) => { sum += (s === 0 || s === 24000 ? 0.5 : 1) * Math.exp(l - top); });
    total += top + Math.log(sum * h);
  }
  return total;
}

describe('Laplace approximation and adaptive Gauss-Hermite quadrature', () => {
  const data = loadCase('poisson-groups', undefined, 'effort');
  const n = data.design.n;
  const response = new GlmResponse('poisson', n);
  response.setResponse(data.design.y);
  const term = data.design.random[0];

  it('the Laplace deviance of the general penalised IRLS equals one-node adaptive quadrature', () => {
    // identity: with one node at the mode, adaptive Gauss-Hermite is the Laplace approximation (Liu and Pierce 1994, §2)
    const general = new LaplaceGeneral(data.design, data.offset!, response);
    const quad = new OneInterceptQuadrature(data.design.X, 2, data.offset!, response, term);
    for (const [theta, b0, b1] of [[0.3, 0.4, 0.3], [1.2, -0.5, 1], [0, 0.5, 0.33], [2.5, 0.1, -0.2]]) {
      general.reset([b0, b1]);
      const a = general.solve([theta], false, 1);
      const b = quad.deviance(theta, [b0, b1], 1, 1);
      expect(Math.abs(a - b)).toBeLessThan(1e-8 * Math.abs(b));
    }
  });

  it('converges to a brute-force integral of the marginal likelihood as nodes grow', () => {
    const quad = new OneInterceptQuadrature(data.design.X, 2, data.offset!, response, term);
    const beta = [0.41, 0.355];
    const theta = 0.9;
    const f = Array.from({ length: n }, (_, i) => data.offset![i] + beta[0] + beta[1] * data.design.X[i * 2 + 1]);
    const brute = bruteForcePoisson(Array.from(data.design.y), f, Array.from(term.index), term.levels.length, theta);
    const errors = [1, 3, 5, 9, 15, 25].map((nodes) => Math.abs(-quad.deviance(theta, beta, 1, nodes) / 2 - brute));
    expect(errors[0]).toBeGreaterThan(1e-3); // Laplace is visibly approximate at SD 0.9
    expect(errors[3]).toBeLessThan(1e-4);
    expect(errors[5]).toBeLessThan(1e-9);
    // from 3 nodes on the error falls with every rule (1 → 3 need not: signed errors of different rules)
    for (let i = 2; i < errors.length; i++) expect(errors[i]).toBeLessThan(errors[i - 1]);
  });
});

describe('boundary fits', () => {
  it('equal group totals give SD exactly 0, a singular flag and the GLM log-likelihood (statsmodels GLM)', () => {
    const ref = countReference('poisson-even').glm as GlmRef;
    const data = loadCase('poisson-even');
    for (const integration of ['laplace', 'quadrature'] as const) {
      const fit = estimateCountModel(data.design, { family: 'poisson', integration });
      expect(fit.theta[0]).toBe(0);
      expect(fit.singular).toBe(true);
      expectGlm(fit, ref, 1e-6);
    }
  });
});

/** Invented crossed and nested count data for structure checks. */
function structuredData(seed: number) {
  const r = testRandom(seed);
  const X: number[][] = [];
  const y: number[] = [];
  const site: number[] = [];
  const year: number[] = [];
  const plot: number[] = [];
  const xs: number[] = [];
  const siteEff = Array.from({ length: 8 }, () => 0.5 * r.normal());
  const yearEff = Array.from({ length: 4 }, () => 0.3 * r.normal());
  for (let s = 0; s < 8; s++) {
    for (let t = 0; t < 4; t++) {
      for (let k = 0; k < 3; k++) {
        const x = 2 * r.uniform() - 1;
        const mu = Math.exp(0.8 + 0.4 * x + siteEff[s] + yearEff[t]);
        // Poisson by inversion (test-local generator)
        let c = 0;
        let p = Math.exp(-mu);
        let acc = p;
        const u = r.uniform();
        while (u > acc) { c++; p *= mu / c; acc += p; }
        X.push([1, x]); y.push(c); site.push(s); year.push(t); plot.push(s * 3 + k); xs.push(x);
      }
    }
  }
  return { X, y, site, year, plot, xs };
}

describe('every grouping structure works with the Laplace approximation', () => {
  const d = structuredData(7);
  const n = d.y.length;
  const oneFactor = handDesign(d.X, ['intercept', 'x'], d.y, [{ factor: 'site', index: d.site }]);
  const response = new GlmResponse('poisson', n);
  response.setResponse(d.y);
  const zero = new Float64Array(n);
  const quad = new OneInterceptQuadrature(oneFactor.X, 2, zero, response, oneFactor.random[0]);

  it('crossed site × year with the year SD at zero equals the site-only Laplace deviance', () => {
    const crossed = handDesign(d.X, ['intercept', 'x'], d.y, [{ factor: 'site', index: d.site }, { factor: 'year', index: d.year }]);
    const general = new LaplaceGeneral(crossed, zero, response);
    // engine order puts the larger factor (site, 8 levels) first
    general.reset([0.7, 0.4]);
    expect(Math.abs(general.solve([0.6, 0], false, 1) - quad.deviance(0.6, [0.7, 0.4], 1, 1))).toBeLessThan(1e-8);
    const fit = estimateCountModel(crossed, { family: 'poisson' });
    expect(fit.converged).toBe(true);
    expect(fit.theta.every((t) => Number.isFinite(t) && t >= 0)).toBe(true);
    // the crossed fit can only improve on the site-only fit (nested models, ML)
    const siteOnly = estimateCountModel(oneFactor, { family: 'poisson' });
    expect(fit.logLik).toBeGreaterThanOrEqual(siteOnly.logLik - 1e-6);
  });

  it('a correlated random slope with slope SD and correlation at zero equals the intercept-only deviance', () => {
    const slope = handDesign(d.X, ['intercept', 'x'], d.y, [{ factor: 'site', index: d.site, slopes: [d.xs], slopeNames: ['x'] }]);
    const general = new LaplaceGeneral(slope, zero, response);
    general.reset([0.7, 0.4]);
    // θ of a correlated 2×2 template: (T11, T21, T22)
    expect(Math.abs(general.solve([0.6, 0, 0], false, 1) - quad.deviance(0.6, [0.7, 0.4], 1, 1))).toBeLessThan(1e-8);
    const fit = estimateCountModel(slope, { family: 'poisson' });
    expect(Number.isFinite(fit.logLik)).toBe(true);
    expect(fit.logLik).toBeGreaterThanOrEqual(estimateCountModel(oneFactor, { family: 'poisson' }).logLik - 1e-6);
  });

  it('nested plots within sites: plot SD at zero equals the site-only deviance; the fit improves on it', () => {
    const nested = handDesign(d.X, ['intercept', 'x'], d.y, [{ factor: 'site', index: d.site }, { factor: 'plot', index: d.plot }]);
    const general = new LaplaceGeneral(nested, zero, response);
    general.reset([0.7, 0.4]);
    // engine order: plot (24 levels) first, then site
    expect(Math.abs(general.solve([0, 0.6], false, 1) - quad.deviance(0.6, [0.7, 0.4], 1, 1))).toBeLessThan(1e-8);
    const fit = estimateCountModel(nested, { family: 'poisson' });
    expect(fit.logLik).toBeGreaterThanOrEqual(estimateCountModel(oneFactor, { family: 'poisson' }).logLik - 1e-6);
  });
});

describe('a design refilled in place (a study reusing one design object)', () => {
  it('after X, y and the group index change under a new revision, the fit equals a fit of a fresh design', () => {
    // identity: the kept workspace must not remember the previous replicate (common practice, no source)
    const a = structuredData(11);
    const b = structuredData(12);
    const shuffled = b.site.map((s) => (s + 3) % 8);
    const design = handDesign(a.X, ['intercept', 'x'], a.y, [{ factor: 'site', index: a.site }]);
    const first = estimateCountModel(design, { family: 'poisson' });
    const fresh = handDesign(b.X, ['intercept', 'x'], b.y, [{ factor: 'site', index: shuffled }]);
    const expected = estimateCountModel(fresh, { family: 'poisson' });
    // refill the first design's arrays in place, as a design plan does, and bump its revision
    design.X.set(fresh.X);
    design.y.set(fresh.y);
    design.random[0].index.set(fresh.random[0].index);
    (design as { revision?: number }).revision = 1;
    const refit = estimateCountModel(design, { family: 'poisson' });
    expect(refit.logLik).toBe(expected.logLik);
    expect(Array.from(refit.beta)).toEqual(Array.from(expected.beta));
    expect(refit.theta[0]).toBe(expected.theta[0]);
    expect(refit.logLik).not.toBe(first.logLik);
    // the same design object and revision reuses the workspace with the same result
    expect(estimateCountModel(design, { family: 'poisson' }).logLik).toBe(expected.logLik);
  });
});
