import { describe, expect, it } from 'vitest';
import { Matrix, solve } from 'ml-matrix';
import { fitDesign } from '../../kernel-lib/fit/fit-design';
import { handDesign, testRandom, type TermInput } from '../helpers/simple-design';
import { denseGls, denseMlLogLik, denseRemlLogLik } from '../helpers/dense-likelihood';

/** Relative closeness: an optimiser locates the argmin to about √ε relative precision (Brent 1973, ch. 5). */
function expectRelative(actual: number, expected: number, tol: number) {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(tol * Math.max(Math.abs(expected), 1e-12));
}

/** Balanced one-way layout: m groups × r observations. */
function oneWay(seed: number, m: number, r: number, sdGroup: number, sdResid = 1) {
  const rng = testRandom(seed);
  const X: number[][] = [];
  const y: number[] = [];
  const g: number[] = [];
  for (let l = 0; l < m; l++) {
    const b = rng.normal() * sdGroup;
    for (let j = 0; j < r; j++) { X.push([1]); y.push(3 + b + sdResid * rng.normal()); g.push(l); }
  }
  return { X, y, g };
}

/** Classical ANOVA mean squares of a balanced one-way layout. */
function anova(y: number[], m: number, r: number) {
  const means = Array.from({ length: m }, (_, l) => y.slice(l * r, (l + 1) * r).reduce((a, b) => a + b, 0) / r);
  const grand = y.reduce((a, b) => a + b, 0) / y.length;
  let ssw = 0;
  let ssb = 0;
  for (let l = 0; l < m; l++) {
    ssb += r * (means[l] - grand) ** 2;
    for (let j = 0; j < r; j++) ssw += (y[l * r + j] - means[l]) ** 2;
  }
  return { msw: ssw / (m * (r - 1)), msb: ssb / (m - 1), sst: ssw + ssb, grand };
}

describe('balanced one-way random intercept', () => {
  // Searle, Casella and McCulloch (1992), Variance Components, §3.5-3.7 and §6.6: for balanced data the
  // REML estimators equal the ANOVA estimators σ̂ₑ² = MSW, σ̂ₐ² = (MSB − MSW)/r when these are positive;
  // when MSB < MSW the REML estimate of σₐ² is 0 and σ̂ₑ² = SST/(N − 1).
  it('REML equals the ANOVA estimators over 200 seeded data sets', () => {
    let positive = 0;
    let truncated = 0;
    for (let seed = 1; seed <= 200; seed++) {
      const m = 3 + (seed % 6);
      const r = 2 + (seed % 5);
      const { X, y, g } = oneWay(seed, m, r, seed % 3 === 0 ? 0.2 : 1.5);
      const fit = fitDesign(handDesign(X, ['intercept'], y, [{ factor: 'g', index: g }]));
      const { msw, msb, sst, grand } = anova(y, m, r);
      expect(fit.converged).toBe(true);
      const sdG = fit.random[0].sd;
      if (msb > msw) {
        positive++;
        expectRelative(fit.residualSd ** 2, msw, 1e-6);
        expectRelative(sdG ** 2, (msb - msw) / r, 1e-6);
        expect(fit.singular).toBe(false);
      } else {
        truncated++;
        expect(sdG).toBe(0);
        expect(fit.singular).toBe(true);
        expectRelative(fit.residualSd ** 2, sst / (m * r - 1), 1e-9);
      }
      // balanced data: the GLS intercept is the grand mean and its SE is sqrt(MSB/(m r)) when MSB > MSW
      expect(fit.fixed[0].estimate).toBeCloseTo(grand, 8);
      if (msb > msw) expectRelative(fit.fixed[0].se, Math.sqrt(msb / (m * r)), 1e-6);
    }
    expect(positive).toBeGreaterThan(100);
    expect(truncated).toBeGreaterThan(5);
  });

  // Davies (1947), Statistical Methods in Research and Production, yields of dyestuff in 6 batches × 5
  // preparations, analysed as a one-way random model also in Box and Tiao (1973), Bayesian Inference in
  // Statistical Analysis, §5.1. Data and REML/ML estimates are values from memory (the data reproduce
  // the well-known grand mean 1527.5).
  it('reproduces the published dyestuff batch example', () => {
    const yields = [
      [1545, 1440, 1440, 1520, 1580], [1540, 1555, 1490, 1560, 1495], [1595, 1550, 1605, 1510, 1560],
      [1445, 1440, 1595, 1465, 1545], [1595, 1630, 1515, 1635, 1625], [1520, 1455, 1450, 1480, 1445],
    ];
    const y = yields.flat();
    const g = yields.flatMap((b, l) => b.map(() => l));
    const d = handDesign(y.map(() => [1]), ['intercept'], y, [{ factor: 'batch', index: g }]);
    const reml = fitDesign(d);
    expect(reml.fixed[0].estimate).toBeCloseTo(1527.5, 6);
    expect(reml.random[0].sd).toBeCloseTo(42.0, 1); // value from memory: 42.00
    expect(reml.residualSd).toBeCloseTo(49.51, 1); // value from memory: 49.51
    expect(reml.fixed[0].se).toBeCloseTo(19.38, 1); // value from memory: 19.38
    expect(-2 * reml.logLik).toBeCloseTo(319.7, 0); // value from memory: REML criterion 319.7
    const ml = fitDesign(d, { estimation: 'ML' });
    expect(ml.random[0].sd).toBeCloseTo(37.26, 1); // value from memory: 37.26
    expect(ml.residualSd).toBeCloseTo(49.51, 1); // value from memory: 49.51
    expect(ml.logLik).toBeCloseTo(-163.66, 1); // value from memory: −163.66
  });
});

/** Generated designs that cover crossed, nested and random-slope structures. */
function generated(kind: 'crossed' | 'nested' | 'slope' | 'independent-slopes' | 'unbalanced', seed: number) {
  const rng = testRandom(seed);
  const X: number[][] = [];
  const y: number[] = [];
  const terms: TermInput[] = [];
  if (kind === 'crossed') {
    const sites = 6, years = 4, reps = 3;
    const bs = Array.from({ length: sites }, () => rng.normal());
    const by = Array.from({ length: years }, () => 0.6 * rng.normal());
    const si: number[] = [], yi: number[] = [];
    for (let s = 0; s < sites; s++) for (let t = 0; t < years; t++) for (let k = 0; k < reps; k++) {
      const x = rng.normal();
      X.push([1, x]); y.push(2 + 0.5 * x + bs[s] + by[t] + rng.normal()); si.push(s); yi.push(t);
    }
    terms.push({ factor: 'site', index: si }, { factor: 'year', index: yi });
  } else if (kind === 'nested') {
    const sites = 5, plots = 4, reps = 3;
    const si: number[] = [], pi: number[] = [];
    for (let s = 0; s < sites; s++) {
      const bs = rng.normal();
      for (let p = 0; p < plots; p++) {
        const bp = 0.7 * rng.normal();
        for (let k = 0; k < reps; k++) {
          const x = rng.uniform();
          X.push([1, x]); y.push(1 + x + bs + bp + 0.5 * rng.normal()); si.push(s); pi.push(s * plots + p);
        }
      }
    }
    terms.push({ factor: 'site', index: si }, { factor: 'plot', index: pi });
  } else if (kind === 'unbalanced') {
    const gi: number[] = [];
    for (let l = 0; l < 9; l++) {
      const b = rng.normal();
      for (let k = 0; k < 2 + ((l * 7) % 9); k++) { const x = rng.normal(); X.push([1, x]); y.push(b + 0.3 * x + rng.normal()); gi.push(l); }
    }
    terms.push({ factor: 'g', index: gi });
  } else {
    const groups = 8, reps = 10;
    const gi: number[] = [], xs: number[] = [];
    for (let l = 0; l < groups; l++) {
      const b0 = rng.normal();
      const b1 = 0.3 * b0 + 0.5 * rng.normal();
      for (let k = 0; k < reps; k++) {
        const x = rng.normal();
        X.push([1, x]); y.push(5 + b0 + (0.7 + b1) * x + 0.8 * rng.normal()); gi.push(l); xs.push(x);
      }
    }
    terms.push({ factor: 'g', index: gi, slopes: [xs], slopeNames: ['x'], correlated: kind === 'slope' });
  }
  return handDesign(X, ['intercept', 'x'], y, terms);
}

describe('likelihood identities on generated designs', () => {
  const kinds = ['crossed', 'nested', 'slope', 'independent-slopes', 'unbalanced'] as const;
  for (const kind of kinds) {
    // Any multivariate statistics text: the ML log-likelihood is the Gaussian log density of y
    // under the fitted marginal covariance; computed here densely with ml-matrix.
    it(`${kind}: ML logLik equals the dense Gaussian density and β̂ equals dense GLS`, () => {
      for (const seed of [11, 12, 13]) {
        const d = generated(kind, seed);
        const fit = fitDesign(d, { estimation: 'ML' });
        expect(fit.converged).toBe(true);
        expect(fit.logLik).toBeCloseTo(denseMlLogLik(d, fit), 6);
        const gls = denseGls(d, fit);
        for (let j = 0; j < d.p; j++) {
          expect(fit.fixed[j].estimate).toBeCloseTo(gls.beta[j], 6);
          // SE convention: σ̂²(XᵀV⁻¹X)⁻¹ with V/σ̂² fixed at the estimate
          expect(fit.fixed[j].se).toBeCloseTo(Math.sqrt(gls.cov.get(j, j)), 6);
        }
      }
    });
    // Harville (1974), Biometrika 61:383: restricted log-likelihood of the error contrasts.
    it(`${kind}: REML logLik equals Harville's restricted likelihood`, () => {
      for (const seed of [21, 22]) {
        const d = generated(kind, seed);
        const fit = fitDesign(d);
        expect(fit.converged).toBe(true);
        expect(fit.logLik).toBeCloseTo(denseRemlLogLik(d, fit), 6);
      }
    });
  }

  it('the optimum is a minimum: perturbing the variance parameters never lowers the criterion', () => {
    for (const kind of kinds) {
      const d = generated(kind, 31);
      const fit = fitDesign(d);
      for (let i = 0; i < fit.theta.length; i++) {
        for (const h of [-1e-3, 1e-3]) {
          const start = fit.theta.slice();
          start[i] = Math.max(i in start ? start[i] + h : 0, 0);
          // refit from a perturbed start must not find a lower criterion by more than tolerance
          const again = fitDesign(d, { start });
          expect(again.deviance).toBeGreaterThan(fit.deviance - 1e-6);
        }
      }
    }
  });
});

describe('all grouping factors fixed: ordinary least squares', () => {
  // Identity (any regression text, e.g. Weisberg, Applied Linear Regression, 4th ed. 2014, §3.4):
  // β̂ = (XᵀX)⁻¹Xᵀy, Var β̂ = s²(XᵀX)⁻¹ with s² = RSS/(n − p); solved here with ml-matrix.
  it('coefficients and SEs equal the dummy-coded least-squares solution', () => {
    const rng = testRandom(5);
    const X: number[][] = [];
    const y: number[] = [];
    for (let s = 0; s < 5; s++) for (let k = 0; k < 4 + s; k++) {
      const x = rng.normal();
      X.push([1, x, s === 1 ? 1 : 0, s === 2 ? 1 : 0, s === 3 ? 1 : 0, s === 4 ? 1 : 0]);
      y.push(1 + 2 * x + s + rng.normal());
    }
    const names = ['intercept', 'x', 'site=B', 'site=C', 'site=D', 'site=E'];
    const fit = fitDesign(handDesign(X, names, y));
    const Xm = new Matrix(X);
    const ym = Matrix.columnVector(y);
    const xtx = Xm.transpose().mmul(Xm);
    const beta = solve(xtx, Xm.transpose().mmul(ym)).getColumn(0);
    const res = ym.sub(Xm.mmul(Matrix.columnVector(beta)));
    const s2 = res.transpose().mmul(res).get(0, 0) / (y.length - names.length);
    const inv = solve(xtx, Matrix.eye(names.length, names.length));
    expect(fit.estimation).toBe('OLS');
    names.forEach((_, j) => {
      expect(fit.fixed[j].estimate).toBeCloseTo(beta[j], 8);
      expect(fit.fixed[j].se).toBeCloseTo(Math.sqrt(s2 * inv.get(j, j)), 8);
      expect(fit.fixed[j].df).toBe(y.length - names.length);
    });
    // t interval half-width: qt(0.975, 21) = 2.079614 (standard t table, e.g. Abramowitz and Stegun 1964, table 26.10)
    expect(y.length - names.length).toBe(24);
    const half = fit.fixed[1].upper - fit.fixed[1].estimate;
    expect(half / fit.fixed[1].se).toBeCloseTo(2.063899, 5); // qt(0.975, 24) = 2.0639 (same table)
  });

  it('a site-level covariate with site fixed is reported as aliased (column roles, not names), the rest still estimated', () => {
    const rng = testRandom(9);
    const X: number[][] = [];
    const y: number[] = [];
    const siteCov = [0.3, -1.2, 0.8, 2.0];
    for (let s = 0; s < 4; s++) for (let k = 0; k < 5; k++) {
      const x = rng.normal();
      X.push([1, x, siteCov[s], s === 1 ? 1 : 0, s === 2 ? 1 : 0, s === 3 ? 1 : 0]);
      y.push(x + siteCov[s] + rng.normal());
    }
    const names = ['intercept', 'x', 'elevation', 'site=B', 'site=C', 'site=D'];
    // the roles say which columns are the fixed site's dummies: those claim estimability first
    const design = handDesign(X, names, y);
    for (const j of [3, 4, 5]) design.roles[j] = { kind: 'factor-level', sources: ['site'], fixedGroup: 'site' };
    const fit = fitDesign(design);
    expect(fit.aliased).toEqual(['elevation']);
    const elev = fit.fixed.find((r) => r.term === 'elevation')!;
    expect(elev.aliased).toBe(true);
    expect(Number.isNaN(elev.estimate)).toBe(true);
    expect(fit.warnings.join(' ')).toContain('elevation');
    expect(fit.fixed.find((r) => r.term === 'x')!.aliased).toBe(false);
    expect(Number.isFinite(fit.fixed.find((r) => r.term === 'x')!.se)).toBe(true);
  });
});
