/**
 * Kenward-Roger small-sample inference for fixed effects fitted by REML (Kenward and Roger 1997,
 * Biometrics 53:983-997): the bias-adjusted covariance
 *   Φ_A = Φ + 2Φ [Σᵢⱼ Wᵢⱼ (Qᵢⱼ − PᵢΦPⱼ)] Φ          (Rᵢⱼ = 0 as V is linear in ψ)
 * with Pᵢ = ∂Φ⁻¹/∂ψᵢ = −XᵀV⁻¹VᵢV⁻¹X, Qᵢⱼ = XᵀV⁻¹VᵢV⁻¹VⱼV⁻¹X and W the inverse of the expected
 * REML information ½ tr(P Vᵢ P Vⱼ), and the scaled F statistic λF ~ F(ℓ, m) of their §4.
 *
 * Derivatives are analytic, computed in the (q+p)-space of ./mixed-model-space (no n×n matrices);
 * memory about six (q+p)² arrays, so the method refuses models with q + p > KR_MAX_DIMENSION random
 * plus fixed effects.
 */
import type { DesignMatrices } from '../../data/design-matrices';
import type { ProfiledDeviance } from '../profiled-deviance';
import { varianceParameters, type VarianceParameters } from './variance-parameters';
import { mixedModelSpace } from './mixed-model-space';
import { inverseSpd, multiply } from './dense-ops';

/**
 * Largest q + p handled. At the limit: about 1 s with one random term (block-diagonal algebra), about
 * 10 s and 260 MB with several (dense O((q+p)³)), on the development machine.
 */
export const KR_MAX_DIMENSION = 2000;

export interface KenwardRogerCore {
  p: number;
  /** Φ̂ = (XᵀV̂⁻¹X)⁻¹. */
  phi: Float64Array;
  /** Kenward-Roger adjusted covariance Φ_A. */
  phiAdjusted: Float64Array;
  /** Pᵢ = ∂Φ⁻¹/∂ψᵢ for each free variance parameter, p×p. */
  derivatives: Float64Array[];
  /** W = inverse expected information over the free parameters (f×f), null when singular. */
  covariance: Float64Array | null;
  params: VarianceParameters;
  warnings: string[];
}

/** Error text when a model is too large for the dense (q+p)-space computation, or '' when it fits. */
export function kenwardRogerSizeProblem(dev: ProfiledDeviance): string {
  const dim = dev.q + dev.p;
  return dim > KR_MAX_DIMENSION
    ? `model.interval: "kenward-roger" uses dense matrices of size q + p = ${dim} (random + fixed effects); the limit is ${KR_MAX_DIMENSION}. Use "satterthwaite" for this model`
    : '';
}

/** One (row, column) unit of E_r in (q+p)-space coordinates; both orders are listed for a covariance. */
type UnitPairs = Int32Array;

function unitPairs(dev: ProfiledDeviance, params: VarianceParameters, r: number): UnitPairs {
  const e = params.entries[r];
  const t = dev.terms[e.term];
  const out: number[] = [];
  for (let l = 0; l < t.m; l++) {
    const base = t.start + l * t.k;
    out.push(base + e.a, base + e.b);
    if (e.a !== e.b) out.push(base + e.b, base + e.a);
  }
  return Int32Array.from(out);
}

/**
 * Everything Kenward-Roger needs at the REML estimate (θ̂, σ̂²). Throws only for a model over the
 * size limit; numerical trouble comes back in `warnings` with `covariance` null.
 */
export function kenwardRogerCore(design: DesignMatrices, dev: ProfiledDeviance, theta: ArrayLike<number>, sigma2: number): KenwardRogerCore {
  const size = kenwardRogerSizeProblem(dev);
  if (size) throw new RangeError(size);
  const p = design.p;
  const params = varianceParameters(dev, theta, sigma2);
  const warnings: string[] = [];
  if (params.heldFixed.length) {
    warnings.push(`Kenward-Roger: ${params.heldFixed.join(', ')} on the boundary, held fixed at the estimate (not counted as estimated)`);
  }
  const space = mixedModelSpace(design, dev, theta, sigma2);
  dev.factor(theta);
  if (!space) {
    warnings.push('Kenward-Roger: XᵀV⁻¹X is not positive definite at the estimate; adjustment not available');
    const phi = dev.unscaledFixedCovariance().map((v) => v * sigma2);
    return { p, phi, phiAdjusted: phi, derivatives: [], covariance: null, params, warnings };
  }
  const { dim, j, k, b0, b, hc, u } = space;
  const free = params.free;
  const f = free.length;
  const phi = u.map((v) => v * sigma2);
  const s2 = sigma2 * sigma2;
  const pairs = free.map((r) => (params.entries[r].term < 0 ? null : unitPairs(dev, params, r)));

  // Yᵢ = Eᵢ J (random-term element) or K (residual), D×p
  const ys = pairs.map((pr) => {
    if (!pr) return k;
    const y = new Float64Array(dim * p);
    for (let x = 0; x < pr.length; x += 2) {
      const row = pr[x];
      const from = pr[x + 1];
      for (let a = 0; a < p; a++) y[row * p + a] += j[from * p + a];
    }
    return y;
  });
  // Pᵢ = −σ⁻⁴ JᵀYᵢ
  const derivatives = ys.map((y) => {
    const out = new Float64Array(p * p);
    for (let r = 0; r < dim; r++) {
      for (let a = 0; a < p; a++) {
        const jra = j[r * p + a];
        if (jra === 0) continue;
        for (let c = 0; c < p; c++) out[a * p + c] -= (jra * y[r * p + c]) / s2;
      }
    }
    return out;
  });
  // B0 Yⱼ (D×p), then Qᵢⱼ = σ⁻⁶ Yᵢᵀ B0 Yⱼ
  const b0y = ys.map((y) => {
    const out = new Float64Array(dim * p);
    for (let r = 0; r < dim; r++) {
      for (let x = 0; x < dim; x++) {
        const v = b0[r * dim + x];
        if (v === 0) continue;
        for (let a = 0; a < p; a++) out[r * p + a] += v * y[x * p + a];
      }
    }
    return out;
  });
  const s3 = s2 * sigma2;
  const qMatrix = (i: number, jj: number): Float64Array => {
    const out = new Float64Array(p * p);
    const yi = ys[i];
    const by = b0y[jj];
    for (let r = 0; r < dim; r++) {
      for (let a = 0; a < p; a++) {
        const v = yi[r * p + a];
        if (v === 0) continue;
        for (let c = 0; c < p; c++) out[a * p + c] += (v * by[r * p + c]) / s3;
      }
    }
    return out;
  };

  // expected REML information ½ tr(P Vᵢ P Vⱼ)
  const info = new Float64Array(f * f);
  const residualTrace = (): number => {
    let trHc = 0;
    let trHcHc = 0;
    for (let r = 0; r < dim; r++) {
      trHc += hc[r * dim + r];
      for (let c = 0; c < dim; c++) trHcHc += hc[r * dim + c] * hc[c * dim + r];
    }
    return space.n - 2 * trHc + trHcHc;
  };
  // tr(Eᵢ B(I − HC)) = Σ over Eᵢ's units (x, y) of [B − B·HC][y][x]
  const mixedTrace = (pr: UnitPairs): number => {
    let sum = 0;
    for (let x = 0; x < pr.length; x += 2) {
      const row = pr[x + 1];
      const col = pr[x];
      let v = b[row * dim + col];
      for (let w = 0; w < dim; w++) v -= b[row * dim + w] * hc[w * dim + col];
      sum += v;
    }
    return sum;
  };
  for (let i = 0; i < f; i++) {
    for (let jj = 0; jj <= i; jj++) {
      const pi = pairs[i];
      const pj = pairs[jj];
      let tr: number;
      if (!pi && !pj) tr = residualTrace();
      else if (!pi || !pj) tr = mixedTrace((pi ?? pj)!);
      else {
        // tr(Eᵢ B Eⱼ B) = Σ over units (x,y) of Eᵢ and (z,w) of Eⱼ of B[y][z]·B[w][x]
        tr = 0;
        for (let a = 0; a < pi.length; a += 2) {
          const x = pi[a];
          const y = pi[a + 1];
          for (let c = 0; c < pj.length; c += 2) tr += b[y * dim + pj[c]] * b[pj[c + 1] * dim + x];
        }
      }
      info[i * f + jj] = info[jj * f + i] = tr / (2 * s2);
    }
  }
  const w = inverseSpd(info, f);
  if (!w) {
    warnings.push('Kenward-Roger: the expected information of the variance parameters is singular; adjustment not available');
    return { p, phi, phiAdjusted: phi, derivatives, covariance: null, params, warnings };
  }
  // Φ_A = Φ + 2 Φ [Σ Wᵢⱼ (Qᵢⱼ − PᵢΦPⱼ)] Φ
  const middle = new Float64Array(p * p);
  for (let i = 0; i < f; i++) {
    for (let jj = 0; jj < f; jj++) {
      const wij = w[i * f + jj];
      if (wij === 0) continue;
      const qij = qMatrix(i, jj);
      const ppp = triple(derivatives[i], phi, derivatives[jj], p);
      for (let x = 0; x < p * p; x++) middle[x] += wij * (qij[x] - ppp[x]);
    }
  }
  const adj = triple(phi, middle, phi, p);
  const phiAdjusted = new Float64Array(p * p);
  for (let x = 0; x < p; x++) {
    for (let y = 0; y < p; y++) phiAdjusted[x * p + y] = phi[x * p + y] + (adj[x * p + y] + adj[y * p + x]);
  }
  for (let x = 0; x < p; x++) {
    if (!(phiAdjusted[x * p + x] > 0)) {
      warnings.push('Kenward-Roger: the adjusted covariance has a non-positive variance; the unadjusted covariance is used');
      phiAdjusted.set(phi);
      break;
    }
  }
  return { p, phi, phiAdjusted, derivatives, covariance: w, params, warnings };
}

/** A B C for p×p matrices. */
function triple(a: Float64Array, bm: Float64Array, c: Float64Array, p: number): Float64Array {
  const ab = new Float64Array(p * p);
  for (let i = 0; i < p; i++) for (let k = 0; k < p; k++) { const v = a[i * p + k]; if (v !== 0) for (let j = 0; j < p; j++) ab[i * p + j] += v * bm[k * p + j]; }
  const out = new Float64Array(p * p);
  for (let i = 0; i < p; i++) for (let k = 0; k < p; k++) { const v = ab[i * p + k]; if (v !== 0) for (let j = 0; j < p; j++) out[i * p + j] += v * c[k * p + j]; }
  return out;
}

export interface KenwardRogerTest {
  /** Wald-type F from Φ_A: (Lβ̂)ᵀ(LΦ_ALᵀ)⁻¹(Lβ̂)/ℓ. */
  fUnscaled: number;
  /** λ. */
  scale: number;
  /** λ F, referred to F(ℓ, m). */
  statistic: number;
  numDf: number;
  /** m. */
  denDf: number;
  warnings: string[];
}

/**
 * The Kenward-Roger F test of H₀: Lβ = 0 for L (ℓ×p, full row rank), their §4:
 * A₁ = ΣWᵢⱼ tr(ΘΦPᵢΦ) tr(ΘΦPⱼΦ), A₂ = ΣWᵢⱼ tr(ΘΦPᵢΦΘΦPⱼΦ), Θ = Lᵀ(LΦLᵀ)⁻¹L, and E*, V*, ρ, m, λ
 * as there. For ℓ = 1 this reduces to λ = 1 and m = 2/A₂, the Satterthwaite df computed with the
 * expected information.
 */
export function kenwardRogerTest(core: KenwardRogerCore, beta: ArrayLike<number>, l: ArrayLike<number>, rows: number): KenwardRogerTest {
  const { p, phi, phiAdjusted, derivatives } = core;
  const ell = rows;
  const warnings: string[] = [];
  const lb = new Float64Array(ell);
  for (let r = 0; r < ell; r++) { let s = 0; for (let c = 0; c < p; c++) s += l[r * p + c] * beta[c]; lb[r] = s; }
  const lpl = sandwichRows(l, phi, ell, p);
  const lplA = sandwichRows(l, phiAdjusted, ell, p);
  const invA = inverseSpd(lplA, ell);
  const inv = inverseSpd(lpl, ell);
  if (!invA || !inv) {
    return { fUnscaled: NaN, scale: NaN, statistic: NaN, numDf: ell, denDf: NaN, warnings: ['Kenward-Roger: L Φ Lᵀ is singular: the rows of L are not linearly independent'] };
  }
  let fStat = 0;
  for (let a = 0; a < ell; a++) for (let c = 0; c < ell; c++) fStat += lb[a] * invA[a * ell + c] * lb[c];
  fStat /= ell;
  const w = core.covariance;
  if (!w) return { fUnscaled: fStat, scale: 1, statistic: fStat, numDf: ell, denDf: NaN, warnings: ['Kenward-Roger: df not available (see the fit warnings)'] };
  // Θ = Lᵀ (LΦLᵀ)⁻¹ L (p×p); Mᵢ = ΘΦPᵢΦ
  const theta = new Float64Array(p * p);
  for (let x = 0; x < p; x++) {
    for (let y = 0; y < p; y++) {
      let s = 0;
      for (let a = 0; a < ell; a++) for (let c = 0; c < ell; c++) s += l[a * p + x] * inv[a * ell + c] * l[c * p + y];
      theta[x * p + y] = s;
    }
  }
  const ms = derivatives.map((pi) => multiply(triple(theta, phi, pi, p), phi, p, p, p)); // ΘΦPᵢΦ
  const f = derivatives.length;
  let a1 = 0;
  let a2 = 0;
  const traces = ms.map((m) => { let s = 0; for (let x = 0; x < p; x++) s += m[x * p + x]; return s; });
  for (let i = 0; i < f; i++) {
    for (let j = 0; j < f; j++) {
      const wij = w[i * f + j];
      a1 += wij * traces[i] * traces[j];
      let t = 0;
      for (let x = 0; x < p; x++) for (let y = 0; y < p; y++) t += ms[i][x * p + y] * ms[j][y * p + x];
      a2 += wij * t;
    }
  }
  let scale: number;
  let m: number;
  if (ell === 1) {
    scale = 1;
    m = 2 / a2;
  } else {
    const bb = (a1 + 6 * a2) / (2 * ell);
    const g = ((ell + 1) * a1 - (ell + 4) * a2) / ((ell + 2) * a2);
    const den = 3 * ell + 2 * (1 - g);
    const c1 = g / den;
    const c2 = (ell - g) / den;
    const c3 = (ell + 2 - g) / den;
    const eStar = 1 / (1 - a2 / ell);
    const vStar = (2 / ell) * ((1 + c1 * bb) / ((1 - c2 * bb) ** 2 * (1 - c3 * bb)));
    const rho = vStar / (2 * eStar * eStar);
    m = 4 + (ell + 2) / (ell * rho - 1);
    scale = m / (eStar * (m - 2));
  }
  if (!(m > 0 && Number.isFinite(m) && scale > 0 && Number.isFinite(scale))) {
    warnings.push(`Kenward-Roger: the df approximation broke down (A₁ = ${a1.toPrecision(4)}, A₂ = ${a2.toPrecision(4)}); the F statistic is referred to F(ℓ, 2/A₂) unscaled`);
    scale = 1;
    m = 2 / a2;
  }
  return { fUnscaled: fStat, scale, statistic: scale * fStat, numDf: ell, denDf: m, warnings };
}

/** L A Lᵀ (ℓ×ℓ). */
function sandwichRows(l: ArrayLike<number>, a: Float64Array, ell: number, p: number): Float64Array {
  const out = new Float64Array(ell * ell);
  for (let r = 0; r < ell; r++) {
    for (let c = 0; c < ell; c++) {
      let s = 0;
      for (let x = 0; x < p; x++) for (let y = 0; y < p; y++) s += l[r * p + x] * a[x * p + y] * l[c * p + y];
      out[r * ell + c] = s;
    }
  }
  return out;
}

/** Kenward-Roger df for a single contrast c: 2/A₂ with Θ = ccᵀ/(cᵀΦc). */
export function kenwardRogerDf(core: KenwardRogerCore, c: ArrayLike<number>): number {
  if (!core.covariance) return NaN;
  const { p, phi, derivatives } = core;
  const f = derivatives.length;
  const phiC = new Float64Array(p);
  for (let x = 0; x < p; x++) { let s = 0; for (let y = 0; y < p; y++) s += phi[x * p + y] * c[y]; phiC[x] = s; }
  let v = 0;
  for (let x = 0; x < p; x++) v += c[x] * phiC[x];
  // aᵢ = cᵀΦPᵢΦc / cᵀΦc
  const a = derivatives.map((pi) => {
    let s = 0;
    for (let x = 0; x < p; x++) for (let y = 0; y < p; y++) s += phiC[x] * pi[x * p + y] * phiC[y];
    return s / v;
  });
  let a2 = 0;
  for (let i = 0; i < f; i++) for (let j = 0; j < f; j++) a2 += core.covariance[i * f + j] * a[i] * a[j];
  return a2 > 0 ? 2 / a2 : Infinity;
}
