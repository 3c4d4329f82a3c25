/**
 * The variance parameters ψ used by the small-sample methods: the elements of each random term's
 * covariance matrix Σₜ = σ² T Tᵀ (variances and, for correlated terms, covariances) and the
 * residual variance σ², in that order. On this scale the marginal covariance
 * V = σ² I + Σₜ Zₜ (I ⊗ Σₜ) Zₜᵀ is linear in ψ, which is what the Kenward-Roger formulas assume
 * (Kenward and Roger 1997, Biometrics 53:983, §2, with their R_ij = 0); the Satterthwaite df are
 * invariant to the choice at an interior optimum.
 *
 * A term whose Σₜ is singular at the estimate (a variance on the zero boundary) is held fixed at
 * its estimate: its elements are not "free", and the caller reports them.
 */
import type { ProfiledDeviance } from '../profiled-deviance';
import { BOUNDARY_TOLERANCE } from '../optimise-theta';
import { choleskyInPlace } from '../../numeric/dense';

export interface VarianceEntry {
  /** Engine term index (ProfiledDeviance.terms order), or −1 for the residual variance. */
  term: number;
  /** Row and column of the entry in Σₜ (a ≥ b). */
  a: number;
  b: number;
}

export interface VarianceParameters {
  /** "var(site)", "var(site:x)", "cov(site:intercept,x)", "var(residual)". */
  names: string[];
  /** ψ̂, every entry. */
  values: Float64Array;
  entries: VarianceEntry[];
  /** Indices of entries treated as estimated (interior of the parameter space). */
  free: number[];
  /** 1 where the entry is free. */
  isFree: Uint8Array;
  /** Names of the entries held fixed because their term sits on the boundary. */
  heldFixed: string[];
}

function componentName(factor: string, term: string): string {
  return term === 'intercept' ? factor : `${factor}:${term}`;
}

/** ψ̂ from the engine's θ̂ and σ̂², with the boundary terms marked. */
export function varianceParameters(dev: ProfiledDeviance, theta: ArrayLike<number>, sigma2: number): VarianceParameters {
  dev.setTheta(theta);
  const names: string[] = [];
  const values: number[] = [];
  const entries: VarianceEntry[] = [];
  const free: number[] = [];
  const heldFixed: string[] = [];
  dev.terms.forEach((t, s) => {
    const T = dev.templates[s];
    const k = t.k;
    const labels = t.term.terms;
    const onBoundary = (j: number) => T[j * k + j] < BOUNDARY_TOLERANCE;
    const termFixed = t.term.correlated && labels.some((_, j) => onBoundary(j));
    const push = (a: number, b: number, isFree: boolean) => {
      let sum = 0;
      for (let c = 0; c <= b; c++) sum += T[a * k + c] * T[b * k + c];
      const name = a === b
        ? `var(${componentName(t.term.factor, labels[a])})`
        : `cov(${t.term.factor}:${labels[b]},${labels[a]})`;
      if (isFree) free.push(values.length); else heldFixed.push(name);
      names.push(name);
      values.push(sigma2 * sum);
      entries.push({ term: s, a, b });
    };
    if (t.term.correlated) {
      // same column-major lower order as θ
      for (let b = 0; b < k; b++) for (let a = b; a < k; a++) push(a, b, !termFixed);
    } else {
      for (let j = 0; j < k; j++) push(j, j, !onBoundary(j));
    }
  });
  free.push(values.length);
  names.push('var(residual)');
  values.push(sigma2);
  entries.push({ term: -1, a: 0, b: 0 });
  const isFree = new Uint8Array(values.length);
  for (const i of free) isFree[i] = 1;
  return { names, values: Float64Array.from(values), entries, free, isFree, heldFixed };
}

/**
 * θ and σ² for a ψ near ψ̂. Terms with no free entry keep Σₜ at its estimate (θ scaled by σ̂/σ).
 * Returns σ², or NaN when ψ is outside the parameter space (a negative variance, a Σₜ that is not
 * positive definite).
 */
export function thetaFromPsi(
  dev: ProfiledDeviance, params: VarianceParameters, psi: ArrayLike<number>, thetaHat: ArrayLike<number>, out: Float64Array,
): number {
  const sigma2 = psi[psi.length - 1];
  if (!(sigma2 > 0)) return NaN;
  const sigma2Hat = params.values[params.values.length - 1];
  const rescale = Math.sqrt(sigma2Hat / sigma2);
  let e = 0;
  for (let s = 0; s < dev.terms.length; s++) {
    const t = dev.terms[s];
    const k = t.k;
    const start = t.thetaStart;
    const first = e;
    const count = t.thetaCount;
    e += count;
    let anyFree = false;
    for (let i = first; i < first + count; i++) if (params.isFree[i]) { anyFree = true; break; }
    if (!anyFree) {
      for (let i = 0; i < count; i++) out[start + i] = thetaHat[start + i] * rescale;
      continue;
    }
    if (!t.term.correlated) {
      for (let j = 0; j < k; j++) {
        const v = params.isFree[first + j] ? psi[first + j] : params.values[first + j];
        if (v < 0) return NaN;
        out[start + j] = Math.sqrt(v / sigma2);
      }
      continue;
    }
    // Σₜ/σ² = T Tᵀ: T is its Cholesky factor
    const m = new Float64Array(k * k);
    let idx = first;
    for (let b = 0; b < k; b++) for (let a = b; a < k; a++) m[a * k + b] = psi[idx++] / sigma2;
    if (choleskyInPlace(m, k) >= 0) return NaN;
    idx = start;
    for (let b = 0; b < k; b++) for (let a = b; a < k; a++) out[idx++] = m[a * k + b];
  }
  return sigma2;
}

/** −2 log-likelihood (ML) or −2 restricted log-likelihood (REML) at (θ, σ²) with β profiled out:
 * log|L|² [+ log|RX|²] + ν log(2πσ²) + r²(θ)/σ², ν = n (ML) or n − p (REML)
 * (Bates et al. 2015, J. Stat. Softw. 67(1), eqs. 34 and 41 before σ² is profiled). */
export function unprofiledDeviance(dev: ProfiledDeviance, theta: ArrayLike<number>, sigma2: number): number {
  if (!(sigma2 > 0) || !dev.factor(theta)) return Infinity;
  const nu = dev.reml ? dev.n - dev.p : dev.n;
  let v = dev.logDetL() + nu * Math.log(2 * Math.PI * sigma2) + dev.penalisedRss() / sigma2;
  if (dev.reml) v += dev.logDetRX();
  return v;
}
