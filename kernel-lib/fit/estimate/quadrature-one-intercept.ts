/**
 * Marginal log-likelihood of a generalised linear mixed model with one grouping factor and a
 * random intercept, by adaptive Gauss-Hermite quadrature (Liu and Pierce 1994, Biometrika 81:624;
 * Pinheiro and Bates 1995, J. Comput. Graph. Stat. 4:12, §3): the groups are independent, so
 * log L = Σ_j log ∫ Π_i p(y_i | η_i = f_i + θ z_i u) φ(u) du, each integral centred at its mode û_j
 * and scaled by the curvature there. With one node this is the Laplace approximation.
 * The per-group modes are kept between calls as warm starts; nothing is allocated per call.
 */
import type { RandomTerm } from '../../data/design-matrices';
import { gaussHermite } from '../../numeric/gauss-hermite';
import { choleskyInPlace, inverseFromCholesky } from '../../numeric/dense';
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
  private index: Int32Array;
  private readonly fisher: Float64Array;
  private readonly a: Float64Array;
  private readonly c: Float64Array;
  private readonly d: Float64Array;
  /** Fixed effects of the last covariance or predictor call. */
  readonly beta: Float64Array;
  private g = 0;
  private grad = 0;
  private hess = 0;
  // gradient workspaces: d w/dη per row, scores at a node, per-group sums and derivatives (length p or 1 + p)
  private readonly slope: Float64Array;
  private readonly nodeScore: Float64Array;
  private readonly nodeSx: Float64Array;
  private nodeSz = 0;
  private readonly sx: Float64Array;
  private readonly swzx: Float64Array;
  private readonly sw3x: Float64Array;
  private readonly dU: Float64Array;
  private readonly dH: Float64Array;
  private readonly gPsi: Float64Array;
  private readonly acc: Float64Array;
  /** dû_j/dψ per group (m × (1 + p)) at the point psiAt, valid after a gradient evaluation. */
  private readonly modeSlopes: Float64Array;
  private readonly psiAt: Float64Array;
  private readonly psiMove: Float64Array;
  private slopesValid = false;

  constructor(readonly X: Float64Array, p: number, readonly offset: Float64Array, readonly response: GlmResponse, term: RandomTerm) {
    this.n = response.n;
    this.p = p;
    this.m = term.levels.length;
    const { n, m } = this;
    this.groupStart = new Int32Array(m + 1);
    this.groupRows = new Int32Array(n);
    this.z = new Float64Array(n);
    this.index = term.index;
    this.setGroups(term);
    this.modes = new Float64Array(m);
    this.curvature = new Float64Array(m);
    this.fixedPart = new Float64Array(n);
    this.eta = new Float64Array(n);
    this.score = new Float64Array(n);
    this.weight = new Float64Array(n);
    this.fisher = new Float64Array(n);
    this.a = new Float64Array(p * p);
    this.c = new Float64Array(m * p);
    this.d = new Float64Array(m);
    this.beta = new Float64Array(p);
    this.slope = new Float64Array(n);
    this.nodeScore = new Float64Array(n);
    this.nodeSx = new Float64Array(p);
    this.sx = new Float64Array(p);
    this.swzx = new Float64Array(p);
    this.sw3x = new Float64Array(p);
    this.dU = new Float64Array(p + 1);
    this.dH = new Float64Array(p + 1);
    this.gPsi = new Float64Array(p + 1);
    this.acc = new Float64Array(p + 1);
    this.modeSlopes = new Float64Array(m * (p + 1));
    this.psiAt = new Float64Array(p + 1);
    this.psiMove = new Float64Array(p + 1);
  }

  /**
   * Rows of each group and the term's column z, from the term's index and values (same n and
   * levels); called again when a design is refilled in place.
   */
  setGroups(term: RandomTerm): void {
    const { n, m, groupStart, groupRows, z } = this;
    this.slopesValid = false;
    this.index = term.index;
    groupStart.fill(0);
    for (let i = 0; i < n; i++) groupStart[term.index[i] + 1]++;
    for (let j = 0; j < m; j++) groupStart[j + 1] += groupStart[j];
    // fill each group from its end (rows ascending within a group); groupStart[j + 1] then holds group j's start
    for (let i = n - 1; i >= 0; i--) groupRows[--groupStart[term.index[i] + 1]] = i;
    for (let j = 0; j < m; j++) groupStart[j] = groupStart[j + 1];
    groupStart[m] = n;
    const k = term.terms.length;
    for (let i = 0; i < n; i++) z[i] = term.values[i * k];
  }

  /** η = offset + Xβ + θ z u_group for every observation. */
  private fullPredictor(theta: number): void {
    const { n, p, X } = this;
    for (let i = 0, r = 0; i < n; i++, r += p) {
      let s = this.offset[i];
      for (let a = 0; a < p; a++) s += X[r + a] * this.beta[a];
      this.eta[i] = s + theta * this.z[i] * this.modes[this.index[i]];
    }
  }

  /**
   * The joint penalised weighted least-squares matrix with u eliminated group by group (weights
   * `w`): A = XᵀWX − Σ_j c_j c_jᵀ/d_j with d_j = 1 + θ² Σ w z², c_j = θ Σ w z x.
   */
  private schur(theta: number, w: Float64Array): void {
    const { n, p, m, X, a, c, d } = this;
    a.fill(0);
    c.fill(0);
    d.fill(1);
    for (let i = 0, row = 0; i < n; i++, row += p) {
      const wi = w[i] > 1e-300 ? w[i] : 1e-300;
      const j = this.index[i];
      const wz = wi * this.z[i];
      d[j] += theta * theta * wz * this.z[i];
      for (let b = 0; b < p; b++) {
        const xb = X[row + b];
        c[j * p + b] += theta * wz * xb;
        for (let e = 0; e <= b; e++) a[b * p + e] += wi * xb * X[row + e];
      }
    }
    for (let j = 0; j < m; j++) {
      const inv = 1 / d[j];
      for (let b = 0; b < p; b++) {
        const cb = c[j * p + b] * inv;
        for (let e = 0; e <= b; e++) a[b * p + e] -= cb * c[j * p + e];
      }
    }
  }

  /**
   * Covariance of β at (θ, β) and the modes of the last evaluation: the inverse of the Schur
   * complement with Fisher weights, as in LaplaceGeneral.fixedCovariance; also the conditional
   * SDs θ/√d_j of the group effects.
   */
  fixedCovariance(theta: number, beta: ArrayLike<number>, k: number, modeSds: Float64Array): Float64Array {
    const { p, m } = this;
    for (let b = 0; b < p; b++) this.beta[b] = beta[b];
    this.fullPredictor(theta);
    this.response.kernel(this.eta, k, 0, this.n, null, this.score, this.weight, this.fisher);
    this.schur(theta, this.fisher);
    for (let j = 0; j < m; j++) modeSds[j] = Math.abs(theta) / Math.sqrt(this.d[j]);
    const out = new Float64Array(p * p);
    if (choleskyInPlace(this.a, p) >= 0) return out.fill(NaN);
    inverseFromCholesky(this.a, p, out);
    return out;
  }

  /** η at (θ, β) and the current modes, copied out. */
  predictor(theta: number, beta: ArrayLike<number>): Float64Array {
    for (let b = 0; b < this.p; b++) this.beta[b] = beta[b];
    this.fullPredictor(theta);
    return Float64Array.from(this.eta);
  }

  /** η of one group's rows (positions from..to of groupRows) at random effect u. */
  private groupPredictor(from: number, to: number, theta: number, u: number): void {
    const rows = this.groupRows;
    for (let r = from; r < to; r++) {
      const i = rows[r];
      this.eta[i] = this.fixedPart[i] + theta * this.z[i] * u;
    }
  }

  /** Log integrand g(u) = Σ ℓ − u²/2 of group j at u, with its derivative and −second derivative. */
  private at(j: number, theta: number, u: number, k: number): void {
    const from = this.groupStart[j];
    const to = this.groupStart[j + 1];
    const rows = this.groupRows;
    this.groupPredictor(from, to, theta, u);
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

  /** g(u); with `sums`, also Σ s z and Σ s x over the group's rows (nodeSz, nodeSx). */
  private valueAt(j: number, theta: number, u: number, k: number, sums: boolean): number {
    const from = this.groupStart[j];
    const to = this.groupStart[j + 1];
    const rows = this.groupRows;
    this.groupPredictor(from, to, theta, u);
    if (!sums) return this.response.kernel(this.eta, k, from, to, null, null, null, null, rows) - 0.5 * u * u;
    const ll = this.response.kernel(this.eta, k, from, to, null, this.nodeScore, null, null, rows);
    const { p, X, z, nodeScore, nodeSx } = this;
    let sz = 0;
    nodeSx.fill(0);
    for (let r = from; r < to; r++) {
      const i = rows[r];
      const si = nodeScore[i];
      sz += si * z[i];
      for (let b = 0, row = i * p; b < p; b++) nodeSx[b] += si * X[row + b];
    }
    this.nodeSz = sz;
    return ll - 0.5 * u * u;
  }

  /** Forget the warm starts (e.g. a new response). */
  reset(): void {
    this.modes.fill(0);
    this.slopesValid = false;
  }

  /**
   * −2 log L at (θ, β, k) with `nodes` quadrature points per group (1 = Laplace). Each group's
   * mode comes from Newton's method with step halving (the log integrand is concave in u for
   * these families, so this converges from any start). With `grad` (length 1 + p), also writes the
   * exact gradient of this approximation in (θ, β): the mode and the curvature move with the
   * parameters (implicit differentiation of the mode equation), and the adaptive nodes with them.
   */
  deviance(theta: number, beta: ArrayLike<number>, k: number, nodes: number, grad: Float64Array | null = null): number {
    const { n, p, m, X } = this;
    for (let i = 0, r = 0; i < n; i++, r += p) {
      let s = this.offset[i];
      for (let a = 0; a < p; a++) s += X[r + a] * beta[a];
      this.fixedPart[i] = s;
    }
    const rule = nodes > 1 ? gaussHermite(nodes) : null;
    if (grad) grad.fill(0);
    const { dU, dH, gPsi, acc, modeSlopes, psiAt, psiMove } = this;
    // warm start: the last modes moved to first order by their stored derivatives dû/dψ
    const predict = this.slopesValid;
    if (predict) {
      psiMove[0] = theta - psiAt[0];
      for (let a = 0; a < p; a++) psiMove[1 + a] = beta[a] - psiAt[1 + a];
    }
    let total = 0;
    for (let j = 0; j < m; j++) {
      let u = this.modes[j];
      if (predict) {
        let move = 0;
        for (let c = 0; c <= p; c++) move += modeSlopes[j * (p + 1) + c] * psiMove[c];
        if (Number.isFinite(move)) u += move;
      }
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
      if (!Number.isFinite(this.g)) {
        this.slopesValid = false;
        return Infinity;
      }
      this.modes[j] = u;
      const hess = this.hess;
      this.curvature[j] = hess;
      if (grad) {
        this.modeDerivatives(j, theta, u, k, hess);
        for (let c = 0; c <= p; c++) modeSlopes[j * (p + 1) + c] = dU[c];
      }
      if (!rule) {
        total += this.g - 0.5 * Math.log(hess);
        if (grad) for (let c = 0; c <= p; c++) grad[c] -= 2 * (gPsi[c] - (0.5 * dH[c]) / hess);
        continue;
      }
      // u = û + √2 σ̂ x: ∫ e^{g} du = √2 σ̂ Σ_k w_k e^{g(û + √2 σ̂ x_k) + x_k²}
      const scale = Math.SQRT2 / Math.sqrt(hess);
      const gMode = this.g;
      let sum = 0;
      if (grad) acc.fill(0);
      for (let q = 0; q < rule.nodes.length; q++) {
        const x = rule.nodes[q];
        const uq = u + scale * x;
        const v = this.valueAt(j, theta, uq, k, grad !== null);
        const e = rule.weights[q] * Math.exp(v - gMode + x * x);
        sum += e;
        if (grad) {
          // d g(u_q)/dψ = ∂g/∂ψ + g'(u_q) (dû/dψ + x dσ/dψ), σ = √2/√h, dσ/dψ = −σ/(2h) dh/dψ
          const gu = theta * this.nodeSz - uq;
          acc[0] += e * (uq * this.nodeSz + gu * (dU[0] - (0.5 * scale * x * dH[0]) / hess));
          for (let b = 0; b < p; b++) acc[1 + b] += e * (this.nodeSx[b] + gu * (dU[1 + b] - (0.5 * scale * x * dH[1 + b]) / hess));
        }
      }
      total += gMode + Math.log(sum) + Math.log(scale) - 0.5 * LOG_2PI;
      if (grad) for (let c = 0; c <= p; c++) grad[c] -= 2 * (acc[c] / sum - (0.5 * dH[c]) / hess);
    }
    this.recordPoint(theta, beta, grad !== null);
    return -2 * (total + this.response.constant(k));
  }

  /**
   * Where the modes now are. Slopes computed with a gradient belong to this point; an evaluation
   * without one keeps them only at the same (θ, β) (another k, e.g. a difference in k).
   */
  private recordPoint(theta: number, beta: ArrayLike<number>, withSlopes: boolean): void {
    const { psiAt, p } = this;
    if (!withSlopes) {
      let same = this.slopesValid && psiAt[0] === theta;
      for (let a = 0; a < p && same; a++) same = psiAt[1 + a] === beta[a];
      this.slopesValid = same;
      return;
    }
    psiAt[0] = theta;
    for (let a = 0; a < p; a++) psiAt[1 + a] = beta[a];
    this.slopesValid = true;
  }

  /**
   * At group j's mode û (scores and weights of its rows in place): ∂g/∂ψ at û (gPsi), dû/dψ (dU)
   * and dh/dψ (dH) for ψ = (θ, β), from g_u(û; ψ) = 0: dû/dψ = g_uψ / h.
   */
  private modeDerivatives(j: number, theta: number, u: number, k: number, hess: number): void {
    const { p, X, z, score, weight, slope, eta, dU, dH, gPsi, sx, swzx, sw3x } = this;
    const from = this.groupStart[j];
    const to = this.groupStart[j + 1];
    const rows = this.groupRows;
    this.response.weightSlope(eta, k, from, to, slope, rows);
    let szs = 0;
    let szzw = 0;
    let szzzs = 0;
    sx.fill(0);
    swzx.fill(0);
    sw3x.fill(0);
    for (let r = from; r < to; r++) {
      const i = rows[r];
      const zi = z[i];
      const wz = weight[i] * zi;
      const szz = slope[i] * zi * zi;
      szs += score[i] * zi;
      szzw += wz * zi;
      szzzs += szz * zi;
      for (let b = 0, row = i * p; b < p; b++) {
        const xb = X[row + b];
        sx[b] += score[i] * xb;
        swzx[b] += wz * xb;
        sw3x[b] += szz * xb;
      }
    }
    const t2 = theta * theta;
    dU[0] = (szs - theta * u * szzw) / hess;
    dH[0] = 2 * theta * szzw + t2 * szzzs * (u + theta * dU[0]);
    gPsi[0] = u * szs;
    for (let b = 0; b < p; b++) {
      dU[1 + b] = (-theta * swzx[b]) / hess;
      dH[1 + b] = t2 * (sw3x[b] + theta * dU[1 + b] * szzzs);
      gPsi[1 + b] = sx[b];
    }
  }
}
