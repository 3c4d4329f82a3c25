import { Matrix, CholeskyDecomposition, EigenvalueDecomposition, inverse } from 'ml-matrix';
import type { DesignMatrices } from '../../kernel-lib/data/design-matrices';
import type { FitResult } from '../../kernel-lib/fit/result';
import { denseMarginalCovariance } from './dense-likelihood';

/**
 * Small-sample inference quantities computed the textbook way, with n×n matrices in ml-matrix
 * (a general-purpose library), independent of the engine's (q+p)-space algebra and of its finite
 * differences. Variance parameters ψ: the elements of each term's covariance matrix and the
 * residual variance, so V = Σᵣ ψᵣ Vᵣ is linear (Kenward and Roger 1997, Biometrics 53:983, §2).
 */
export interface DenseInference {
  phi: Matrix;
  /** Kenward-Roger adjusted covariance (Kenward and Roger 1997, with R = 0). */
  phiAdjusted: Matrix;
  /** Expected REML information ½ tr(P Vᵢ P Vⱼ) (Searle, Casella and McCulloch 1992, §6.6). */
  expectedInformation: Matrix;
  /** Observed REML (or ML) information: yᵀPVᵢPVⱼPy − ½ tr(P Vᵢ P Vⱼ) (Searle et al. 1992, §6.6 and §6.3). */
  observedInformation: Matrix;
  /** ∂Φ/∂ψᵢ = Φ XᵀV⁻¹VᵢV⁻¹X Φ. */
  phiGradients: Matrix[];
  /** Pᵢ = −XᵀV⁻¹VᵢV⁻¹X. */
  pMatrices: Matrix[];
  parameterNames: string[];
}

function denseX(design: DesignMatrices): Matrix {
  const X = new Matrix(design.n, design.p);
  for (let i = 0; i < design.n; i++) for (let j = 0; j < design.p; j++) X.set(i, j, design.X[i * design.p + j]);
  return X;
}

/** (M + Mᵀ)/2 as a new matrix (ml-matrix's add/sub/mul/div work in place, so copies are explicit here). */
function sym(m: Matrix): Matrix {
  return m.clone().add(m.transpose()).div(2);
}

/** Derivative matrices Vᵣ for the covariance elements of every random term, then the residual. */
function derivativeMatrices(design: DesignMatrices, skip: (factor: string, a: number, b: number) => boolean) {
  const n = design.n;
  const mats: Matrix[] = [];
  const names: string[] = [];
  for (const term of design.random) {
    const k = term.terms.length;
    for (let b = 0; b < k; b++) {
      for (let a = b; a < k; a++) {
        if (a !== b && !term.correlated) continue;
        if (skip(term.factor, a, b)) continue;
        const G = new Matrix(n, n);
        for (let i = 0; i < n; i++) {
          for (let j = 0; j < n; j++) {
            if (term.index[i] !== term.index[j]) continue;
            let v = term.values[i * k + a] * term.values[j * k + b];
            if (a !== b) v += term.values[i * k + b] * term.values[j * k + a];
            G.set(i, j, v);
          }
        }
        mats.push(G);
        names.push(`${term.factor}[${a},${b}]`);
      }
    }
  }
  mats.push(Matrix.eye(n, n));
  names.push('residual');
  return { mats, names };
}

/**
 * All quantities at the fitted variance parameters. `reml` selects the criterion for the observed
 * information; `skip` drops parameters held fixed (e.g. on the boundary).
 */
export function denseInference(
  design: DesignMatrices, fit: FitResult, reml = true, skip: (factor: string, a: number, b: number) => boolean = () => false,
): DenseInference {
  const V = denseMarginalCovariance(design, fit);
  const Vinv = sym(new CholeskyDecomposition(V).solve(Matrix.eye(design.n, design.n)));
  const X = denseX(design);
  const y = Matrix.columnVector(Array.from(design.y));
  const VinvX = Vinv.mmul(X);
  const phi = sym(inverse(sym(X.transpose().mmul(VinvX))));
  const P = sym(Vinv.clone().sub(VinvX.mmul(phi).mmul(VinvX.transpose())));
  const { mats, names } = derivativeMatrices(design, skip);
  const f = mats.length;
  const PV = mats.map((G) => P.mmul(G));
  const VinvV = mats.map((G) => Vinv.mmul(G));
  const Py = P.mmul(y);
  const expected = new Matrix(f, f);
  const observed = new Matrix(f, f);
  for (let i = 0; i < f; i++) {
    for (let j = 0; j < f; j++) {
      const tr = PV[i].mmul(PV[j]).trace();
      expected.set(i, j, tr / 2);
      const quad = Py.transpose().mmul(mats[i]).mmul(P).mmul(mats[j]).mmul(Py).get(0, 0);
      const trace = reml ? tr : VinvV[i].mmul(VinvV[j]).trace();
      observed.set(i, j, quad - trace / 2);
    }
  }
  const pMatrices = mats.map((G) => sym(VinvX.transpose().mmul(G).mmul(VinvX)).mul(-1)); // sym() returned a copy
  const phiGradients = pMatrices.map((Pi) => phi.mmul(Pi).mmul(phi).mul(-1));
  const W = inverse(sym(expected));
  const middle = Matrix.zeros(design.p, design.p);
  for (let i = 0; i < f; i++) {
    for (let j = 0; j < f; j++) {
      const Q = VinvX.transpose().mmul(mats[i]).mmul(Vinv).mmul(mats[j]).mmul(VinvX);
      const PPP = pMatrices[i].mmul(phi).mmul(pMatrices[j]);
      middle.add(Q.sub(PPP).mul(W.get(i, j))); // Q is a fresh product, modified in place
    }
  }
  const phiAdjusted = sym(phi.clone().add(phi.mmul(middle).mmul(phi).mul(2)));
  return { phi, phiAdjusted, expectedInformation: expected, observedInformation: observed, phiGradients, pMatrices, parameterNames: names };
}

/** Satterthwaite df 2(cᵀΦc)²/(gᵀ A g) with A the inverse of the given information. */
export function denseSatterthwaiteDf(d: DenseInference, c: number[], information: Matrix): number {
  const cv = Matrix.columnVector(c);
  const v = cv.transpose().mmul(d.phi).mmul(cv).get(0, 0);
  const g = Matrix.columnVector(d.phiGradients.map((G) => cv.transpose().mmul(G).mmul(cv).get(0, 0)));
  const A = inverse(sym(information));
  return (2 * v * v) / g.transpose().mmul(A).mmul(g).get(0, 0);
}

/**
 * Kenward-Roger F test of Lβ = 0 (Kenward and Roger 1997, §4) from the dense quantities:
 * returns the scaled statistic λF, λ and the denominator df m.
 */
export function denseKenwardRogerF(d: DenseInference, beta: number[], L: number[][]): { statistic: number; scale: number; denDf: number } {
  const Lm = new Matrix(L);
  const ell = L.length;
  const b = Matrix.columnVector(beta);
  const lb = Lm.mmul(b);
  const lpaInv = inverse(sym(Lm.mmul(d.phiAdjusted).mmul(Lm.transpose())));
  const F = lb.transpose().mmul(lpaInv).mmul(lb).get(0, 0) / ell;
  const Theta = Lm.transpose().mmul(inverse(sym(Lm.mmul(d.phi).mmul(Lm.transpose())))).mmul(Lm);
  const W = inverse(sym(d.expectedInformation));
  const M = d.pMatrices.map((P) => Theta.mmul(d.phi).mmul(P).mmul(d.phi));
  let A1 = 0;
  let A2 = 0;
  for (let i = 0; i < M.length; i++) {
    for (let j = 0; j < M.length; j++) {
      A1 += W.get(i, j) * M[i].trace() * M[j].trace();
      A2 += W.get(i, j) * M[i].mmul(M[j]).trace();
    }
  }
  const B = (A1 + 6 * A2) / (2 * ell);
  const g = ((ell + 1) * A1 - (ell + 4) * A2) / ((ell + 2) * A2);
  const c1 = g / (3 * ell + 2 * (1 - g));
  const c2 = (ell - g) / (3 * ell + 2 * (1 - g));
  const c3 = (ell + 2 - g) / (3 * ell + 2 * (1 - g));
  const Estar = 1 / (1 - A2 / ell);
  const Vstar = (2 / ell) * ((1 + c1 * B) / ((1 - c2 * B) ** 2 * (1 - c3 * B)));
  const rho = Vstar / (2 * Estar ** 2);
  const m = 4 + (ell + 2) / (ell * rho - 1);
  const lambda = m / (Estar * (m - 2));
  return { statistic: lambda * F, scale: lambda, denDf: m };
}

/**
 * Satterthwaite F of Lβ = 0 by Fai and Cornelius (1996, §2.2): eigen-contrasts of LΦLᵀ (ml-matrix),
 * their Satterthwaite df νₘ with the observed information, E = Σ νₘ/(νₘ − 2), df 2E/(E − ℓ).
 */
export function denseFaiCorneliusF(d: DenseInference, beta: number[], L: number[][]): { statistic: number; denDf: number } {
  const Lm = new Matrix(L);
  const ell = L.length;
  const eig = new EigenvalueDecomposition(sym(Lm.mmul(d.phi).mmul(Lm.transpose())), { assumeSymmetric: true });
  let F = 0;
  let E = 0;
  eig.realEigenvalues.forEach((value, m) => {
    const contrast = eig.eigenvectorMatrix.getColumnVector(m).transpose().mmul(Lm).getRow(0);
    const cb = contrast.reduce((s, c, j) => s + c * beta[j], 0);
    F += (cb * cb) / value;
    const nu = denseSatterthwaiteDf(d, contrast, d.observedInformation);
    E += nu / (nu - 2);
  });
  return { statistic: F / ell, denDf: (2 * E) / (E - ell) };
}
