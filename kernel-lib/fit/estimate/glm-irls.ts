/**
 * Generalised linear model fitted exactly by iteratively reweighted least squares (Newton-Raphson,
 * which is Fisher scoring for the canonical links;
 * McCullagh and Nelder 1989, Generalized Linear Models, 2nd ed., §2.5), with step halving when the
 * log-likelihood falls. Workspaces are allocated once per design; a new response reuses them.
 */
import { choleskyInPlace, forwardSolveInPlace, backSolveTransposeInPlace, inverseFromCholesky } from '../../numeric/dense';
import type { GlmResponse } from './glm-response';

export interface GlmOutcome {
  beta: Float64Array;
  logLik: number;
  iterations: number;
  converged: boolean;
  reason: string;
}

const MAX_ITERATIONS = 100;

export class GlmIrls {
  readonly n: number;
  readonly p: number;
  private readonly eta: Float64Array;
  private readonly mu: Float64Array;
  private readonly score: Float64Array;
  private readonly fisher: Float64Array;
  private readonly weight: Float64Array;
  private readonly xtwx: Float64Array;
  private readonly xtwz: Float64Array;
  private readonly beta: Float64Array;
  private readonly previous: Float64Array;

  constructor(readonly X: Float64Array, p: number, readonly offset: Float64Array, readonly response: GlmResponse) {
    this.n = response.n;
    this.p = p;
    const n = this.n;
    this.eta = new Float64Array(n);
    this.mu = new Float64Array(n);
    this.score = new Float64Array(n);
    this.fisher = new Float64Array(n);
    this.weight = new Float64Array(n);
    this.xtwx = new Float64Array(p * p);
    this.xtwz = new Float64Array(p);
    this.beta = new Float64Array(p);
    this.previous = new Float64Array(p);
  }

  /** Linear predictor Xβ + offset into `out`. */
  linearPredictor(beta: ArrayLike<number>, out: Float64Array): void {
    const { n, p, X, offset } = this;
    for (let i = 0, r = 0; i < n; i++, r += p) {
      let s = offset[i];
      for (let a = 0; a < p; a++) s += X[r + a] * beta[a];
      out[i] = s;
    }
  }

  /**
   * Fit at aggregation k (NB; ignored otherwise). `start` (β) warm-starts the iteration; without it
   * the first step starts from μ = (y + ȳ)/2 (counts) or π = (y + ½)/(m + 1) (binomial), common
   * practice, no source.
   */
  fit(k: number, start?: ArrayLike<number>): GlmOutcome {
    // Newton steps: observed weights (equal to Fisher's for the canonical Poisson and binomial links;
    // positive for the NB log link), so the non-canonical NB also converges quadratically
    const { n, p, eta, mu, score, weight, beta, previous, response } = this;
    if (start) {
      for (let a = 0; a < p; a++) beta[a] = start[a];
      this.linearPredictor(beta, eta);
    } else {
      const y = response.y;
      let mean = 0;
      for (let i = 0; i < n; i++) mean += y[i] / response.trials[i];
      mean /= n;
      for (let i = 0; i < n; i++) {
        if (response.family === 'binomial') {
          const pi = (y[i] + 0.5) / (response.trials[i] + 1);
          eta[i] = Math.log(pi / (1 - pi));
        } else {
          eta[i] = Math.log((y[i] + mean) / 2 + 1e-8);
        }
      }
    }
    let ll = start ? response.kernel(eta, k, 0, n, mu, score, weight, null) : -Infinity;
    if (!start) response.kernel(eta, k, 0, n, mu, score, weight, null);
    let converged = false;
    let reason = '';
    let iterations = 0;
    let haveBeta = Boolean(start);
    for (; iterations < MAX_ITERATIONS; iterations++) {
      // weighted least squares on the working response z = η − offset + s/w
      this.xtwx.fill(0);
      this.xtwz.fill(0);
      for (let i = 0, r = 0; i < n; i++, r += p) {
        const w = weight[i];
        if (!(w > 0)) continue;
        const z = eta[i] - this.offset[i] + score[i] / w;
        for (let a = 0; a < p; a++) {
          const xa = this.X[r + a] * w;
          this.xtwz[a] += xa * z;
          for (let b = 0; b <= a; b++) this.xtwx[a * p + b] += xa * this.X[r + b];
        }
      }
      if (choleskyInPlace(this.xtwx, p) >= 0) {
        reason = 'the weighted cross-product matrix is not positive definite (fitted means at the edge of their range: separation or all-zero groups)';
        break;
      }
      previous.set(beta);
      beta.set(this.xtwz);
      forwardSolveInPlace(this.xtwx, p, beta);
      backSolveTransposeInPlace(this.xtwx, p, beta);
      this.linearPredictor(beta, eta);
      let next = response.kernel(eta, k, 0, n, mu, score, weight, null);
      // step halving (McCullagh and Nelder 1989, §2.5 note on divergence)
      for (let h = 0; haveBeta && !(next >= ll - 1e-12 * Math.abs(ll)) && h < 30; h++) {
        for (let a = 0; a < p; a++) beta[a] = 0.5 * (beta[a] + previous[a]);
        this.linearPredictor(beta, eta);
        next = response.kernel(eta, k, 0, n, mu, score, weight, null);
      }
      const change = Math.abs(next - ll);
      haveBeta = true;
      ll = next;
      if (change <= 1e-13 * (Math.abs(ll) + 1)) { converged = true; iterations++; break; }
    }
    if (!converged && !reason) reason = `no convergence in ${MAX_ITERATIONS} iterations (an estimate may be running to infinity: separation or all-zero groups)`;
    return { beta: Float64Array.from(beta), logLik: ll + response.constant(k), iterations, converged, reason };
  }

  /** Covariance of β: (XᵀWX)⁻¹ with Fisher weights at β (NaN when not positive definite). */
  covariance(beta: ArrayLike<number>, k: number): Float64Array {
    const { n, p, eta, fisher } = this;
    this.linearPredictor(beta, eta);
    this.response.kernel(eta, k, 0, n, null, null, null, fisher);
    const a = new Float64Array(p * p);
    for (let i = 0, r = 0; i < n; i++, r += p) {
      const w = fisher[i];
      for (let c = 0; c < p; c++) {
        const xc = this.X[r + c] * w;
        for (let b = 0; b <= c; b++) a[c * p + b] += xc * this.X[r + b];
      }
    }
    const out = new Float64Array(p * p);
    if (choleskyInPlace(a, p) >= 0) return out.fill(NaN);
    inverseFromCholesky(a, p, out);
    return out;
  }
}
