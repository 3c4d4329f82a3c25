/**
 * Laplace approximation of a generalised linear mixed model's log-likelihood for any grouping
 * structure the normal engine supports (crossed, nested, random slopes), by penalised iteratively
 * reweighted least squares (Breslow and Clayton 1993, J. Am. Stat. Assoc. 88:9; Pinheiro and
 * Bates 1995, J. Comput. Graph. Stat. 4:12, §2; Bates et al. 2015, J. Stat. Softw. 67(1), §3 for
 * the penalised least-squares factorisation, reused here with weights):
 *
 *   −2 log L(θ, β) ≈ −2 Σ ℓ(y | û) + ‖û‖² + log |ΛᵀZᵀWZΛ + I|,
 *
 * with b = Λ(θ)u, u ~ N(0, I), û the conditional mode and W the observed weights −∂²ℓ/∂η² at û.
 * Each iteration is a weighted penalised least-squares problem, solved by the normal engine's
 * block factorisation on √W-scaled copies of X, Z and the working response.
 */
import type { DesignMatrices, RandomTerm } from '../../data/design-matrices';
import { ProfiledDeviance } from '../profiled-deviance';
import type { GlmResponse } from './glm-response';

const MAX_ITERATIONS = 60;

export class LaplaceGeneral {
  readonly n: number;
  readonly p: number;
  readonly q: number;
  /** Unweighted factorisation: term layout, θ length and bounds, templates for reporting. */
  readonly layout: ProfiledDeviance;
  /** Current conditional modes (spherical u and b = Λu, engine term order) and fixed effects. */
  readonly u: Float64Array;
  readonly b: Float64Array;
  readonly beta: Float64Array;
  readonly eta: Float64Array;
  private readonly score: Float64Array;
  private readonly weight: Float64Array;
  private readonly fisher: Float64Array;
  private readonly uPrev: Float64Array;
  private readonly betaPrev: Float64Array;
  private readonly xw: Float64Array;
  private readonly yw: Float64Array;
  private readonly termsW: RandomTerm[];
  private readonly weightedJoint: DesignMatrices;
  private readonly weightedModes: DesignMatrices;
  /** Factorisation of the last weighted system (for log-determinants, covariances, mode SDs). */
  last: ProfiledDeviance | null = null;
  lastFailure = '';

  constructor(readonly design: DesignMatrices, readonly offset: Float64Array, readonly response: GlmResponse) {
    this.n = design.n;
    this.p = design.p;
    const n = this.n;
    this.layout = new ProfiledDeviance({ ...design, p: 0, X: new Float64Array(0), fixedNames: [] }, false);
    this.q = this.layout.q;
    this.u = new Float64Array(this.q);
    this.b = new Float64Array(this.q);
    this.uPrev = new Float64Array(this.q);
    this.beta = new Float64Array(this.p);
    this.betaPrev = new Float64Array(this.p);
    this.eta = new Float64Array(n);
    this.score = new Float64Array(n);
    this.weight = new Float64Array(n);
    this.fisher = new Float64Array(n);
    this.xw = new Float64Array(n * this.p);
    this.yw = new Float64Array(n);
    this.termsW = design.random.map((t) => ({ ...t, values: new Float64Array(t.values.length) }));
    this.weightedJoint = { ...design, X: this.xw, y: this.yw, random: this.termsW };
    this.weightedModes = { ...this.weightedJoint, p: 0, X: new Float64Array(0), fixedNames: [] };
  }

  /** b = Λ(θ)u in the engine's term order (templates must be set). */
  private spread(templatesFrom: ProfiledDeviance): void {
    templatesFrom.spreadInto(this.u, this.b);
  }

  /** η = offset + Xβ + Zb. */
  private predictor(): void {
    const { n, p, eta, b } = this;
    const { X } = this.design;
    for (let i = 0, r = 0; i < n; i++, r += p) {
      let s = this.offset[i];
      for (let a = 0; a < p; a++) s += X[r + a] * this.beta[a];
      eta[i] = s;
    }
    for (const t of this.layout.terms) {
      const { index, values } = t.term;
      const k = t.k;
      for (let i = 0; i < n; i++) {
        const base = t.start + index[i] * k;
        let s = 0;
        for (let j = 0; j < k; j++) s += values[i * k + j] * b[base + j];
        eta[i] += s;
      }
    }
  }

  private penalised(k: number, withWeights: boolean): number {
    let uu = 0;
    for (let c = 0; c < this.q; c++) uu += this.u[c] * this.u[c];
    const ll = withWeights
      ? this.response.kernel(this.eta, k, 0, this.n, null, this.score, this.weight, this.fisher)
      : this.response.kernel(this.eta, k, 0, this.n, null, null, null, null);
    return -2 * ll + uu;
  }

  /** Build and factor the √W-weighted system at the current η (weights already computed). */
  private factorWeighted(theta: ArrayLike<number>, joint: boolean, weights: Float64Array): ProfiledDeviance | null {
    const { n, p, eta, score } = this;
    const { X } = this.design;
    for (let i = 0, r = 0; i < n; i++, r += p) {
      const w = weights[i] > 1e-300 ? weights[i] : 1e-300;
      const sw = Math.sqrt(w);
      // working response of the part being solved for: z = η − offset [− Xβ] + s/w
      let z = eta[i] - this.offset[i] + score[i] / w;
      if (joint) {
        for (let a = 0; a < p; a++) this.xw[r + a] = sw * X[r + a];
      } else {
        for (let a = 0; a < p; a++) z -= X[r + a] * this.beta[a];
      }
      this.yw[i] = sw * z;
      for (let s = 0; s < this.termsW.length; s++) {
        const src = this.design.random[s];
        const k = src.terms.length;
        const dst = this.termsW[s].values;
        for (let j = 0; j < k; j++) dst[i * k + j] = sw * src.values[i * k + j];
      }
    }
    const pd = new ProfiledDeviance(joint ? this.weightedJoint : this.weightedModes, false);
    const ok = pd.factor(theta);
    // a failure of the last pivot only (a working response fitted exactly) leaves L, R and RX valid
    if (!ok && !pd.lastFailure.startsWith('the model fits the response exactly')) {
      this.lastFailure = pd.lastFailure;
      return null;
    }
    return pd;
  }

  /** Start from u = 0 and the given β. */
  reset(beta: ArrayLike<number>): void {
    this.u.fill(0);
    this.b.fill(0);
    for (let a = 0; a < this.p; a++) this.beta[a] = beta[a];
  }

  /**
   * Penalised IRLS at θ from the current state: for u alone (β fixed) or for (β, u) jointly.
   * Returns the Laplace deviance −2 log L at the result, or Infinity when a factorisation fails.
   */
  solve(theta: ArrayLike<number>, joint: boolean, k: number): number {
    this.layout.setTheta(theta);
    this.spread(this.layout);
    this.predictor();
    let pl = this.penalised(k, true);
    let converged = false;
    for (let it = 0; it < MAX_ITERATIONS && !converged; it++) {
      const pd = this.factorWeighted(theta, joint, this.weight);
      if (!pd) return Infinity;
      this.uPrev.set(this.u);
      this.betaPrev.set(this.beta);
      if (joint) pd.beta(this.beta);
      const { u } = pd.randomEffects(this.beta);
      this.u.set(u);
      this.spread(this.layout);
      this.predictor();
      let next = this.penalised(k, true);
      for (let h = 0; !(next <= pl + 1e-10 * Math.abs(pl)) && h < 30; h++) {
        for (let c = 0; c < this.q; c++) this.u[c] = 0.5 * (this.u[c] + this.uPrev[c]);
        for (let a = 0; a < this.p; a++) this.beta[a] = 0.5 * (this.beta[a] + this.betaPrev[a]);
        this.spread(this.layout);
        this.predictor();
        next = this.penalised(k, true);
      }
      converged = Math.abs(pl - next) <= 1e-11 * (Math.abs(next) + 1);
      pl = next;
    }
    // log-determinant with the weights at the final modes
    const pd = this.factorWeighted(theta, false, this.weight);
    if (!pd) return Infinity;
    this.last = pd;
    this.lastFailure = '';
    return pl - 2 * this.response.constant(k) + pd.logDetL();
  }

  /**
   * Covariance of β at the current state: the inverse Schur complement of the joint penalised
   * system with Fisher weights, (XᵀWX − XᵀWZΛ(ΛᵀZᵀWZΛ + I)⁻¹ΛᵀZᵀWX)⁻¹; with θ = 0 this is the
   * GLM's (XᵀWX)⁻¹. Also leaves that factorisation in `last` for the conditional SDs of the modes.
   */
  fixedCovariance(theta: ArrayLike<number>, k: number): Float64Array {
    this.layout.setTheta(theta);
    this.spread(this.layout);
    this.predictor();
    this.response.kernel(this.eta, k, 0, this.n, null, this.score, this.weight, this.fisher);
    const pd = this.factorWeighted(theta, true, this.fisher);
    const out = new Float64Array(this.p * this.p);
    if (!pd) return out.fill(NaN);
    this.last = pd;
    return pd.unscaledFixedCovariance(out);
  }
}
