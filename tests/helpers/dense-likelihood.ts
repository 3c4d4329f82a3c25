import { Matrix, CholeskyDecomposition } from 'ml-matrix';
import type { DesignMatrices } from '../../kernel-lib/data/design-matrices';
import type { FitResult } from '../../kernel-lib/fit/result';

/**
 * Marginal covariance V = Z G Zᵀ + σ² I built densely with ml-matrix (a general-purpose
 * library) from the fitted variance components, independent of the engine's factorisation.
 */
export function denseMarginalCovariance(design: DesignMatrices, fit: FitResult): Matrix {
  const n = design.n;
  const V = Matrix.eye(n, n).mul(fit.residualSd ** 2);
  for (const term of design.random) {
    const k = term.terms.length;
    const G = new Matrix(k, k);
    for (let a = 0; a < k; a++) {
      const sa = fit.random.find((r) => r.factor === term.factor && r.term === term.terms[a])!.sd;
      for (let b = 0; b < k; b++) {
        const sb = fit.random.find((r) => r.factor === term.factor && r.term === term.terms[b])!.sd;
        let rho = a === b ? 1 : 0;
        if (a !== b) {
          const c = fit.correlations.find((r) => r.factor === term.factor &&
            ((r.terms[0] === term.terms[a] && r.terms[1] === term.terms[b]) || (r.terms[1] === term.terms[a] && r.terms[0] === term.terms[b])));
          rho = c ? c.value : 0;
        }
        G.set(a, b, rho * sa * sb);
      }
    }
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        if (term.index[i] !== term.index[j]) continue;
        let s = 0;
        for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) s += term.values[i * k + a] * G.get(a, b) * term.values[j * k + b];
        V.set(i, j, V.get(i, j) + s);
      }
    }
  }
  // ml-matrix's Cholesky demands exact symmetry; the loop above fills both triangles identically
  // up to rounding, so average them
  return V.add(V.transpose()).div(2);
}

function logDet(chol: CholeskyDecomposition): number {
  const L = chol.lowerTriangularMatrix;
  let s = 0;
  for (let i = 0; i < L.rows; i++) s += 2 * Math.log(L.get(i, i));
  return s;
}

/** ML: log N(y; Xβ̂, V) with all constants (any multivariate statistics text). */
export function denseMlLogLik(design: DesignMatrices, fit: FitResult): number {
  const V = denseMarginalCovariance(design, fit);
  const chol = new CholeskyDecomposition(V);
  const r = residualVector(design, fit);
  const vr = chol.solve(r);
  return -0.5 * (design.n * Math.log(2 * Math.PI) + logDet(chol) + r.transpose().mmul(vr).get(0, 0));
}

/**
 * REML: the restricted log-likelihood of Harville (1974, Biometrika 61:383) in the usual form
 * −½[(n−p) log 2π + log|V| + log|XᵀV⁻¹X| + rᵀV⁻¹r], r = y − Xβ̂ (GLS). Harville's error-contrast
 * form adds the constant +½ log|XᵀX|; neither this form nor the engine includes it.
 */
export function denseRemlLogLik(design: DesignMatrices, fit: FitResult): number {
  const V = denseMarginalCovariance(design, fit);
  const chol = new CholeskyDecomposition(V);
  const X = new Matrix(design.n, design.p);
  for (let i = 0; i < design.n; i++) for (let j = 0; j < design.p; j++) X.set(i, j, design.X[i * design.p + j]);
  const xtvx0 = X.transpose().mmul(chol.solve(X));
  const xtvx = xtvx0.add(xtvx0.transpose()).div(2);
  const r = residualVector(design, fit);
  const quad = r.transpose().mmul(chol.solve(r)).get(0, 0);
  return -0.5 * ((design.n - design.p) * Math.log(2 * Math.PI) + logDet(chol) + logDet(new CholeskyDecomposition(xtvx)) + quad);
}

/** GLS estimate (XᵀV⁻¹X)⁻¹XᵀV⁻¹y and its covariance, densely. */
export function denseGls(design: DesignMatrices, fit: FitResult): { beta: number[]; cov: Matrix } {
  const V = denseMarginalCovariance(design, fit);
  const chol = new CholeskyDecomposition(V);
  const X = new Matrix(design.n, design.p);
  for (let i = 0; i < design.n; i++) for (let j = 0; j < design.p; j++) X.set(i, j, design.X[i * design.p + j]);
  const y = Matrix.columnVector(Array.from(design.y));
  const xtvx0 = X.transpose().mmul(chol.solve(X));
  const xtvx = xtvx0.add(xtvx0.transpose()).div(2);
  const cov = new CholeskyDecomposition(xtvx).solve(Matrix.eye(design.p, design.p));
  const beta = cov.mmul(X.transpose().mmul(chol.solve(y))).getColumn(0);
  return { beta, cov };
}

function residualVector(design: DesignMatrices, fit: FitResult): Matrix {
  const r = new Matrix(design.n, 1);
  for (let i = 0; i < design.n; i++) {
    let s = design.y[i];
    for (let j = 0; j < design.p; j++) s -= design.X[i * design.p + j] * fit.fixed[j].estimate;
    r.set(i, 0, s);
  }
  return r;
}
