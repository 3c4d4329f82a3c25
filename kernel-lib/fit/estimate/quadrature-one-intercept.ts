/**
 * Marginal log-likelihood of a generalised linear mixed model with one grouping factor and a
 * random intercept, by adaptive Gauss-Hermite quadrature (Liu and Pierce 1994, Biometrika 81:624;
 * Pinheiro and Bates 1995, J. Comput. Graph. Stat. 4:12, §3): the groups are independent, so
 * log L = Σ_j log ∫ Π_i p(y_i | η_i = f_i + θ z_i u) φ(u) du, each integral centred at its mode û_j
 * and scaled by the curvature there. With one node this is the Laplace approximation.
 * The per-group modes are kept between calls as warm starts; nothing is allocated per call.
 */
import type { RandomTerm } from '../design';
import { gaussHermite } from '../../numeric/gauss-hermite';
import type { GlmResponse } from './glm-response';

const LOG_2PI = Math.log(2 * Math.PI);

export class OneInterceptQuadrature {
  readonly n: number;
  readonly p: number;
  readonly m: number;
  /** Conditional modes û_j (spherical scale: b_j = θ û_j) from the last evaluation. */
  readonly modes: Float64Array;
  /** −∂² of the log integrand at each mode (1 + θ² Σ z² w). */
  readonly curvature: Float64Array;
  private readonly groupStart: Int32Array;
  private readonly groupRows: Int32Array;
  private readonly z: Float64Array;
  private readonly fixedPart: Float64Array;
  private readonly eta: Float64Array;
  private readonly score: Float64Array;
  private readonly weight: Float64Array;
  private g = 0;
  private grad = 0;
  private hess = 0;

  constructor(readonly X: Float64Array, p: number, readonly offset: Float64Array, readonly response: GlmResponse, term: RandomTerm) {
    this.n = response.n;
    this.p = p;
    this.m = term.levels.length;
    const { n, m } = this;
    this.groupStart = new Int32Array(m + 1);
    for (let i = 0; i < n; i++) this.groupStart[term.index[i] + 1]++;
    for (let j = 0; j < m; j++) this.groupStart[j + 1] += this.groupStart[j];
    this.groupRows = new Int32Array(n);
    const fill = this.groupStart.slice(0, m);
    for (let i = 0; i < n; i++) this.groupRows[fill[term.index[i]]++] = i;
    const k = term.terms.length;
    this.z = new Float64Array(n);
    for (let i = 0; i < n; i++) this.z[i] = term.values[i * k];
    this.modes = new Float64Array(m);
    this.curvature = new Float64Array(m);
    this.fixedPart = new Float64Array(n);
    this.eta = new Float64Array(n);
    this.score = new Float64Array(n);
    this.weight = new Float64Array(n);
  }

  /** Log integrand g(u) = Σ ℓ − u²/2 of group j at u, with its derivative and −second derivative. */
  private at(j: number, theta: number, u: number, k: number): void {
    const from = this.groupStart[j];
    const to = this.groupStart[j + 1];
    const rows = this.groupRows;
    for (let r = from; r < to; r++) {
      const i = rows[r];
      this.eta[i] = this.fixedPart[i] + theta * this.z[i] * u;
    }
    const ll = this.response.kernel(this.eta, k, from, to, null, this.score, this.weight, null, rows);
    let sz = 0;
    let szz = 0;
    for (let r = from; r < to; r++) {
      const i = rows[r];
      sz += this.z[i] * this.score[i];
      szz += this.z[i] * this.z[i] * this.weight[i];
    }
    this.g = ll - 0.5 * u * u;
    this.grad = theta * sz - u;
    this.hess = 1 + theta * theta * szz;
  }

  /** g(u) only (one pass, no derivatives). */
  private valueAt(j: number, theta: number, u: number, k: number): number {
    const from = this.groupStart[j];
    const to = this.groupStart[j + 1];
    const rows = this.groupRows;
    for (let r = from; r < to; r++) {
      const i = rows[r];
      this.eta[i] = this.fixedPart[i] + theta * this.z[i] * u;
    }
    return this.response.kernel(this.eta, k, from, to, null, null, null, null, rows) - 0.5 * u * u;
  }

  /** Forget the warm starts (e.g. a new response). */
  reset(): void {
    this.modes.fill(0);
  }

  /**
   * −2 log L at (θ, β, k) with `nodes` quadrature points per group (1 = Laplace). Each group's
   * mode comes from Newton's method with step halving (the log integrand is concave in u for
   * these families, so this converges from any start).
   */
  deviance(theta: number, beta: ArrayLike<number>, k: number, nodes: number): number {
    const { n, p, m, X } = this;
    for (let i = 0, r = 0; i < n; i++, r += p) {
      let s = this.offset[i];
      for (let a = 0; a < p; a++) s += X[r + a] * beta[a];
      this.fixedPart[i] = s;
    }
    const rule = nodes > 1 ? gaussHermite(nodes) : null;
    let total = 0;
    for (let j = 0; j < m; j++) {
      let u = this.modes[j];
      this.at(j, theta, u, k);
      for (let it = 0; it < 100; it++) {
        const step = this.grad / this.hess;
        if (!(Math.abs(step) > 1e-10 * (1 + Math.abs(u)))) break;
        const g0 = this.g;
        let t = 1;
        let un = u + step;
        this.at(j, theta, un, k);
        for (let h = 0; !(this.g >= g0 - 1e-13 * Math.abs(g0)) && h < 40; h++) {
          t *= 0.5;
          un = u + t * step;
          this.at(j, theta, un, k);
        }
        u = un;
      }
      if (!Number.isFinite(this.g)) return Infinity;
      this.modes[j] = u;
      this.curvature[j] = this.hess;
      if (!rule) {
        total += this.g - 0.5 * Math.log(this.hess);
        continue;
      }
      // u = û + √2 σ̂ x: ∫ e^{g} du = √2 σ̂ Σ_k w_k e^{g(û + √2 σ̂ x_k) + x_k²}
      const scale = Math.SQRT2 / Math.sqrt(this.hess);
      const gMode = this.g;
      let sum = 0;
      for (let q = 0; q < rule.nodes.length; q++) {
        const x = rule.nodes[q];
        const v = this.valueAt(j, theta, u + scale * x, k);
        sum += rule.weights[q] * Math.exp(v - gMode + x * x);
      }
      total += gMode + Math.log(sum) + Math.log(scale) - 0.5 * LOG_2PI;
    }
    return -2 * (total + this.response.constant(k));
  }
}
