import { describe, expect, it } from 'vitest';
import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import type { DesignMatrices } from '../../kernel-lib/data/design-matrices';
import { ProfiledDeviance } from '../../kernel-lib/fit/profiled-deviance';
import { handDesign, testRandom, type TermInput } from '../helpers/simple-design';

/**
 * The profiled criterion at any θ computed densely with ml-matrix (a general-purpose library),
 * from the relative marginal covariance W(θ) = I + Z Λ(θ) Λ(θ)ᵀ Zᵀ:
 *   r²(θ) = min_β (y − Xβ)ᵀ W⁻¹ (y − Xβ)  (generalised least squares),
 *   ML:   log|W| + n (1 + log(2π r²/n)),
 *   REML: log|W| + log|Xᵀ W⁻¹ X| + (n − p)(1 + log(2π r²/(n − p)))
 * (Bates, Mächler, Bolker and Walker 2015, J. Stat. Softw. 67(1), §3.4, with |ΛᵀZᵀZΛ + I| = |W|
 * by the matrix determinant lemma and RXᵀRX = XᵀW⁻¹X).
 */
function denseCriterion(d: DesignMatrices, dev: ProfiledDeviance, theta: number[], reml: boolean) {
  const n = d.n;
  const W = Matrix.eye(n, n);
  for (const layout of dev.terms) {
    const t = layout.term;
    const k = t.terms.length;
    // template T: lower triangle filled column by column from θ (diagonal only when uncorrelated)
    const T = new Matrix(k, k);
    let idx = layout.thetaStart;
    for (let j = 0; j < k; j++) for (let i = j; i < k; i++) if (t.correlated || i === j) T.set(i, j, theta[idx++]);
    const G = T.mmul(T.transpose());
    for (let a = 0; a < n; a++) for (let b = 0; b < n; b++) {
      if (t.index[a] !== t.index[b]) continue;
      let s = 0;
      for (let u = 0; u < k; u++) for (let v = 0; v < k; v++) s += t.values[a * k + u] * G.get(u, v) * t.values[b * k + v];
      W.set(a, b, W.get(a, b) + s);
    }
  }
  const chol = new CholeskyDecomposition(W.add(W.transpose()).div(2));
  const logDet = (c: CholeskyDecomposition) => {
    const L = c.lowerTriangularMatrix;
    let s = 0;
    for (let i = 0; i < L.rows; i++) s += 2 * Math.log(L.get(i, i));
    return s;
  };
  const X = new Matrix(n, d.p);
  for (let i = 0; i < n; i++) for (let j = 0; j < d.p; j++) X.set(i, j, d.X[i * d.p + j]);
  const y = Matrix.columnVector(Array.from(d.y));
  const xtwx0 = X.transpose().mmul(chol.solve(X));
  const xtwx = new CholeskyDecomposition(xtwx0.add(xtwx0.transpose()).div(2));
  const beta = xtwx.solve(X.transpose().mmul(chol.solve(y)));
  const r = y.sub(X.mmul(beta));
  const r2 = r.transpose().mmul(chol.solve(r)).get(0, 0);
  const dof = reml ? n - d.p : n;
  const value = logDet(chol) + (reml ? logDet(xtwx) : 0) + dof * (1 + Math.log((2 * Math.PI * r2) / dof));
  return { value, beta: beta.getColumn(0), sigma2: r2 / dof };
}

/** Invented unbalanced data: 7 sites (2 to 6 rows), 3 years crossed, a covariate, seeded. */
function data(seed: number) {
  const rng = testRandom(seed);
  const site: number[] = [];
  const year: number[] = [];
  const rows: number[][] = [];
  const x: number[] = [];
  const y: number[] = [];
  const siteEffect = Array.from({ length: 7 }, () => rng.normal());
  const slopeEffect = Array.from({ length: 7 }, () => 0.5 * rng.normal());
  for (let s = 0; s < 7; s++) {
    for (let r = 0; r < 2 + (s % 5); r++) {
      const xi = rng.normal();
      const yr = (s + r) % 3;
      site.push(s);
      year.push(yr);
      x.push(xi);
      rows.push([1, xi]);
      y.push(2 + 0.7 * xi + siteEffect[s] + slopeEffect[s] * xi + 0.3 * yr + 0.8 * rng.normal());
    }
  }
  return { site, year, x, rows, y };
}

const cases: { name: string; terms: (t: ReturnType<typeof data>) => TermInput[]; theta: number[][] }[] = [
  { name: 'one random intercept', terms: (t) => [{ factor: 'site', index: t.site }], theta: [[0], [0.4], [1.7]] },
  { name: 'crossed intercepts (site, year)', terms: (t) => [{ factor: 'site', index: t.site }, { factor: 'year', index: t.year }], theta: [[0.8, 0.3], [0, 1.2]] },
  { name: 'correlated intercept and slope', terms: (t) => [{ factor: 'site', index: t.site, slopes: [t.x], slopeNames: ['x'] }], theta: [[0.9, -0.3, 0.5], [0.6, 0.2, 0]] },
  { name: 'uncorrelated intercept and slope with a crossed year', terms: (t) => [{ factor: 'site', index: t.site, slopes: [t.x], slopeNames: ['x'], correlated: false }, { factor: 'year', index: t.year }], theta: [[0.9, 0.4, 0.2]] },
];

describe('ProfiledDeviance.evaluate equals the dense criterion at any θ', () => {
  for (const c of cases) {
    for (const reml of [true, false]) {
      it(`${c.name}, ${reml ? 'REML' : 'ML'}`, () => {
        const t = data(17);
        const d = handDesign(t.rows, ['intercept', 'x'], t.y, c.terms(t));
        const dev = new ProfiledDeviance(d, reml);
        for (const theta of c.theta) {
          const ref = denseCriterion(d, dev, theta, reml);
          expect(dev.evaluate(theta)).toBeCloseTo(ref.value, 9);
          // β̂(θ) is the GLS estimate and σ̂² = r²/(n − p) or r²/n
          const beta = dev.beta();
          expect(beta[0]).toBeCloseTo(ref.beta[0], 9);
          expect(beta[1]).toBeCloseTo(ref.beta[1], 9);
          expect(dev.sigma2()).toBeCloseTo(ref.sigma2, 10);
        }
      });
    }
  }
});

describe('ProfiledDeviance with a new response', () => {
  it('setResponse gives the criterion of a fresh object built on the new y', () => {
    const t = data(3);
    const u = data(4);
    const d = handDesign(t.rows, ['intercept', 'x'], t.y, [{ factor: 'site', index: t.site }, { factor: 'year', index: t.year }]);
    const dev = new ProfiledDeviance(d, true);
    dev.evaluate([0.5, 0.5]);
    dev.setResponse(Float64Array.from(u.y));
    const fresh = new ProfiledDeviance(handDesign(t.rows, ['intercept', 'x'], u.y, [{ factor: 'site', index: t.site }, { factor: 'year', index: t.year }]), true);
    for (const theta of [[0.5, 0.5], [1.3, 0]]) expect(dev.evaluate(theta)).toBeCloseTo(fresh.evaluate(theta), 10);
  });

  it('θ = 0 is ordinary least squares: ML deviance n(1 + log(2π RSS/n))', () => {
    // with W = I the criterion reduces to the OLS log-likelihood (any regression text)
    const t = data(9);
    const d = handDesign(t.rows, ['intercept', 'x'], t.y, [{ factor: 'site', index: t.site }]);
    const X = new Matrix(t.rows);
    const y = Matrix.columnVector(t.y);
    const beta = new CholeskyDecomposition(X.transpose().mmul(X)).solve(X.transpose().mmul(y));
    const res = y.sub(X.mmul(beta));
    const rss = res.transpose().mmul(res).get(0, 0);
    const n = t.y.length;
    expect(new ProfiledDeviance(d, false).evaluate([0])).toBeCloseTo(n * (1 + Math.log((2 * Math.PI * rss) / n)), 9);
  });
});
