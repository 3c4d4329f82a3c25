/**
 * Per-observation pieces of the log-likelihood of a count or detection response as a function of
 * the linear predictor η, for the estimate steps (IRLS, penalised IRLS, adaptive quadrature).
 * Written as loops over arrays, one family per loop, because they run inside every iteration.
 *
 *   Poisson, log link:         ℓ = yη − e^η − log y!
 *   binomial (m trials), logit: ℓ = yη − m log(1 + e^η) + log C(m, y)
 *   negative binomial NB2, log link, aggregation k (variance μ + μ²/k):
 *                              ℓ = log Γ(y + k) − log Γ(k) − log y! + k log(k/(k + μ)) + y log(μ/(k + μ))
 * (McCullagh and Nelder 1989, Generalized Linear Models, 2nd ed., §2.2 and §11.3; Hilbe 2011,
 * Negative Binomial Regression, 2nd ed., §8.2.)
 */
import { logGamma } from '../../numeric/special';

export type CountFamily = 'poisson' | 'binomial' | 'negative-binomial';

const POISSON = 0;
const BINOMIAL = 1;
const NEGATIVE_BINOMIAL = 2;

/** Largest η passed to exp: beyond it e^η overflows; such a predictor is reported through the deviance. */
const ETA_MAX = 700;

/** The response with everything that depends on y alone computed once. */
export class GlmResponse {
  readonly n: number;
  readonly code: number;
  readonly y: Float64Array;
  /** Binomial trials per observation (1 for the other families). */
  readonly trials: Float64Array;
  /** Σ of the terms of ℓ that depend on y only (−log y!, log C(m, y)). */
  yConstant = 0;
  /** NB only: Σ [log Γ(y + k) − log Γ(k)] at `kCached`. */
  private gammaTerms = 0;
  private kCached = NaN;

  constructor(readonly family: CountFamily, n: number, trials?: Float64Array) {
    this.n = n;
    this.code = family === 'poisson' ? POISSON : family === 'binomial' ? BINOMIAL : NEGATIVE_BINOMIAL;
    this.y = new Float64Array(n);
    this.trials = trials ? Float64Array.from(trials) : new Float64Array(n).fill(1);
  }

  /** Replace the response (same design); recomputes the y-only constants. */
  setResponse(y: ArrayLike<number>): void {
    const { n } = this;
    let c = 0;
    for (let i = 0; i < n; i++) {
      const yi = y[i];
      this.y[i] = yi;
      if (this.code === BINOMIAL) {
        const m = this.trials[i];
        c += logGamma(m + 1) - logGamma(yi + 1) - logGamma(m - yi + 1);
      } else {
        c -= logGamma(yi + 1);
      }
    }
    this.yConstant = c;
    this.kCached = NaN;
  }

  /** The NB gamma terms Σ [log Γ(y + k) − log Γ(k)] (cached per k). */
  private negativeBinomialGammaTerms(k: number): number {
    if (k !== this.kCached) {
      let s = 0;
      const lk = logGamma(k);
      for (let i = 0; i < this.n; i++) s += logGamma(this.y[i] + k) - lk;
      this.gammaTerms = s;
      this.kCached = k;
    }
    return this.gammaTerms;
  }

  /** The full log-likelihood Σ ℓ(y_i | η_i) with every constant. */
  logLik(eta: Float64Array, k: number): number {
    return this.kernel(eta, k, 0, this.n, null, null, null, null) + this.constant(k);
  }

  /** Everything of Σ ℓ that does not depend on η. */
  constant(k: number): number {
    return this.code === NEGATIVE_BINOMIAL ? this.yConstant + this.negativeBinomialGammaTerms(k) : this.yConstant;
  }

  /**
   * Σ over observations from..to−1 of the η-dependent part of ℓ; optionally writes μ, the score
   * s = ∂ℓ/∂η, the observed weight −∂²ℓ/∂η² and the expected (Fisher) weight per observation.
   * Rows are taken through `rows` when given (a group's observations), else from..to directly.
   */
  kernel(
    eta: Float64Array, k: number, from: number, to: number,
    mu: Float64Array | null, score: Float64Array | null, weight: Float64Array | null, fisher: Float64Array | null,
    rows: Int32Array | null = null,
  ): number {
    const y = this.y;
    const m = this.trials;
    let sum = 0;
    if (this.code === POISSON) {
      for (let r = from; r < to; r++) {
        const i = rows ? rows[r] : r;
        const e = eta[i] > ETA_MAX ? ETA_MAX : eta[i];
        const mi = Math.exp(e);
        sum += y[i] * e - mi;
        if (mu) mu[i] = mi;
        if (score) score[i] = y[i] - mi;
        if (weight) weight[i] = mi;
        if (fisher) fisher[i] = mi;
      }
    } else if (this.code === BINOMIAL) {
      for (let r = from; r < to; r++) {
        const i = rows ? rows[r] : r;
        const e = eta[i];
        let p: number;
        let log1pExp: number;
        if (e >= 0) {
          const t = Math.exp(-e);
          p = 1 / (1 + t);
          log1pExp = e + Math.log1p(t);
        } else {
          const t = Math.exp(e);
          p = t / (1 + t);
          log1pExp = Math.log1p(t);
        }
        sum += y[i] * e - m[i] * log1pExp;
        const w = m[i] * p * (1 - p);
        if (mu) mu[i] = m[i] * p;
        if (score) score[i] = y[i] - m[i] * p;
        if (weight) weight[i] = w;
        if (fisher) fisher[i] = w;
      }
    } else {
      for (let r = from; r < to; r++) {
        const i = rows ? rows[r] : r;
        const e = eta[i] > ETA_MAX ? ETA_MAX : eta[i];
        const mi = Math.exp(e);
        const km = k + mi;
        // k log(k/(k+μ)) + y log(μ/(k+μ)), written to stay accurate when k ≫ μ
        sum += -k * Math.log1p(mi / k) + y[i] * (e - Math.log(km));
        if (mu) mu[i] = mi;
        if (score) score[i] = (k * (y[i] - mi)) / km;
        if (weight) weight[i] = (k * mi * (y[i] + k)) / (km * km);
        if (fisher) fisher[i] = (k * mi) / km;
      }
    }
    return sum;
  }

  /**
   * d w / dη of the observed weight w = −∂²ℓ/∂η² at η_i, for analytic gradients of the Laplace and
   * quadrature deviances (the weight enters through the log-determinant). Rows as in `kernel`.
   */
  weightSlope(eta: Float64Array, k: number, from: number, to: number, out: Float64Array, rows: Int32Array | null = null): void {
    const y = this.y;
    const m = this.trials;
    for (let r = from; r < to; r++) {
      const i = rows ? rows[r] : r;
      const e = eta[i] > ETA_MAX ? ETA_MAX : eta[i];
      if (this.code === POISSON) {
        out[i] = Math.exp(e);
      } else if (this.code === BINOMIAL) {
        const p = e >= 0 ? 1 / (1 + Math.exp(-e)) : Math.exp(e) / (1 + Math.exp(e));
        out[i] = m[i] * p * (1 - p) * (1 - 2 * p);
      } else {
        // w = kμ(y + k)/(k + μ)², so dw/dη = kμ(y + k)(k − μ)/(k + μ)³
        const mi = Math.exp(e);
        const km = k + mi;
        out[i] = (k * mi * (y[i] + k) * (k - mi)) / (km * km * km);
      }
    }
  }

  /** Variance function V(μ) (per trial count for binomial: m π (1 − π)). */
  variance(mu: number, i: number, k: number): number {
    if (this.code === POISSON) return mu;
    if (this.code === BINOMIAL) return mu * (1 - mu / this.trials[i]);
    return mu + (mu * mu) / k;
  }
}
