/**
 * Exact second-order quantities of a linear mixed model, computed in the (q + p)-dimensional space
 * spanned by the columns of M = [Z X] instead of with n×n matrices.
 *
 * With V = σ²(I + ZΛΛᵀZᵀ) and A = ΛᵀZᵀZΛ + I, Woodbury gives V⁻¹ = σ⁻²(I − Z S Zᵀ), S = ΛA⁻¹Λᵀ
 * (Henderson and Searle 1981, SIAM Review 23:53). Every matrix the Kenward-Roger formulas need is
 * I + M(·)Mᵀ or a derivative ∂V/∂ψ_r, which is I (residual variance) or Z E_r Zᵀ (an element of a
 * random term's covariance), so products and traces reduce to (q+p)×(q+p) algebra on C = MᵀM:
 *   V⁻¹M = σ⁻² M (I − S̃C),  V⁻¹X = σ⁻² M K with K = [−S ZᵀX; I],  J = C K = σ² MᵀV⁻¹X,
 *   P = V⁻¹ − V⁻¹XΦXᵀV⁻¹ = σ⁻²(I − M H Mᵀ) with H = S̃ + K U Kᵀ and U = (XᵀV⁻¹X)⁻¹/σ².
 * Cost O((q+p)³) with several random terms, O((q+p)²(k+p)) with one (block-diagonal S); memory a few
 * (q+p)² arrays; independent of n once C is built.
 */
import type { DesignMatrices } from '../../data/design-matrices';
import type { ProfiledDeviance } from '../profiled-deviance';
import { choleskyInPlace, inverseFromCholesky } from '../../numeric/dense';
import { inverseSpd } from './dense-ops';

export interface MixedModelSpace {
  q: number;
  p: number;
  /** D = q + p. */
  dim: number;
  n: number;
  sigma2: number;
  /** C = MᵀM, D×D. */
  c: Float64Array;
  /** S = ΛA⁻¹Λᵀ, q×q. */
  s: Float64Array;
  /** K = [−S ZᵀX; I], D×p. */
  k: Float64Array;
  /** J = C K, D×p. */
  j: Float64Array;
  /** U = (J_X)⁻¹ = (RXᵀRX)⁻¹, p×p. */
  u: Float64Array;
  /** B0 = C − C S̃ C = σ² MᵀV⁻¹M, D×D. */
  b0: Float64Array;
  /** B = B0 − J U Jᵀ = σ² MᵀPM, D×D. */
  b: Float64Array;
  /** H C, D×D (P = σ⁻²(I − MHMᵀ)). */
  hc: Float64Array;
}

/** C per design object: it depends on X and Z only, rebuilt when a refilled design changes its revision (see ProfiledDeviance.acquire). */
const crossProducts = new WeakMap<DesignMatrices, { revision: number; c: Float64Array }>();

/**
 * C = [Z X]ᵀ[Z X] with Z columns in the engine's order (term by term, level by level, effect by effect).
 * Built once per design object and shared: callers must not write to it.
 */
function crossProductOfZX(design: DesignMatrices, dev: ProfiledDeviance): Float64Array {
  const kept = crossProducts.get(design);
  const revision = design.revision ?? 0;
  if (kept && kept.revision === revision && kept.c.length === (dev.q + design.p) ** 2) return kept.c;
  const c = buildCrossProductOfZX(design, dev);
  crossProducts.set(design, { revision, c });
  return c;
}

function buildCrossProductOfZX(design: DesignMatrices, dev: ProfiledDeviance): Float64Array {
  const { n, p, X } = design;
  const q = dev.q;
  const dim = q + p;
  const c = new Float64Array(dim * dim);
  const cols = new Int32Array(q > 0 ? dev.terms.reduce((s, t) => s + t.k, 0) : 0);
  const vals = new Float64Array(cols.length);
  for (let i = 0; i < n; i++) {
    let nz = 0;
    for (const t of dev.terms) {
      const base = t.start + t.term.index[i] * t.k;
      for (let j = 0; j < t.k; j++) {
        const v = t.term.values[i * t.k + j];
        if (v === 0) continue;
        cols[nz] = base + j;
        vals[nz++] = v;
      }
    }
    const r = i * p;
    for (let a = 0; a < nz; a++) {
      const ra = cols[a] * dim;
      for (let b = 0; b < nz; b++) c[ra + cols[b]] += vals[a] * vals[b];
      for (let b = 0; b < p; b++) c[ra + q + b] += vals[a] * X[r + b];
    }
    for (let a = 0; a < p; a++) {
      const xa = X[r + a];
      if (xa === 0) continue;
      const ra = (q + a) * dim;
      for (let b = 0; b < p; b++) c[ra + q + b] += xa * X[r + b];
    }
  }
  for (let a = 0; a < q; a++) for (let b = 0; b < p; b++) c[(q + b) * dim + a] = c[a * dim + q + b];
  return c;
}

/** Columns of a q-row matrix times Λ, in place: column (t, l, j) becomes Σ_{i ≥ j} T[i][j] · column (t, l, i). */
function timesLambda(a: Float64Array, rows: number, stride: number, dev: ProfiledDeviance): void {
  for (let s = 0; s < dev.terms.length; s++) {
    const t = dev.terms[s];
    const T = dev.templates[s];
    const k = t.k;
    for (let l = 0; l < t.m; l++) {
      const base = t.start + l * k;
      for (let r = 0; r < rows; r++) {
        const rr = r * stride + base;
        // ascending j reads columns i ≥ j, which are not yet overwritten
        for (let j = 0; j < k; j++) {
          let sum = 0;
          for (let i = j; i < k; i++) sum += T[i * k + j] * a[rr + i];
          a[rr + j] = sum;
        }
      }
    }
  }
}

/** Λ times a q×cols matrix, in place: row (t, l, i) becomes Σ_{j ≤ i} T[i][j] · row (t, l, j). */
function lambdaTimes(a: Float64Array, cols: number, dev: ProfiledDeviance): void {
  for (let s = 0; s < dev.terms.length; s++) {
    const t = dev.terms[s];
    const T = dev.templates[s];
    const k = t.k;
    for (let l = 0; l < t.m; l++) {
      const base = t.start + l * k;
      // descending i reads rows j ≤ i, which are not yet overwritten
      for (let i = k - 1; i >= 0; i--) {
        const ri = (base + i) * cols;
        for (let c = 0; c < cols; c++) {
          let sum = 0;
          for (let j = 0; j <= i; j++) sum += T[i * k + j] * a[(base + j) * cols + c];
          a[ri + c] = sum;
        }
      }
    }
  }
}

/** The (q+p)-space buffers of one design, kept with it (several (q+p)² arrays: allocating them per call dominated). */
interface SpaceBuffers {
  s: Float64Array; a: Float64Array; scratch: Float64Array; k: Float64Array; j: Float64Array; jx: Float64Array;
  cs: Float64Array; b0: Float64Array; b: Float64Array; hc: Float64Array; ju: Float64Array; ku: Float64Array;
}

const buffers = new WeakMap<DesignMatrices, SpaceBuffers>();

function buffersFor(design: DesignMatrices, q: number, p: number, severalTerms: boolean): SpaceBuffers {
  const dim = q + p;
  const kept = buffers.get(design);
  if (kept && kept.b0.length === dim * dim && kept.s.length === q * q && kept.k.length === dim * p && kept.a.length === (severalTerms ? q * q : 0)) return kept;
  // the dense A and its scratch only when several terms make S dense
  const dense = severalTerms ? q * q : 0;
  const made: SpaceBuffers = {
    s: new Float64Array(q * q), a: new Float64Array(dense), scratch: new Float64Array(dense), k: new Float64Array(dim * p),
    j: new Float64Array(dim * p), jx: new Float64Array(p * p), cs: new Float64Array(dim * q), b0: new Float64Array(dim * dim),
    b: new Float64Array(dim * dim), hc: new Float64Array(dim * dim), ju: new Float64Array(dim * p), ku: new Float64Array(dim * p),
  };
  buffers.set(design, made);
  return made;
}

/**
 * The (q+p)-space quantities at θ and σ². `c` may be passed in when already built.
 * Returns null when XᵀV⁻¹X is not positive definite. The arrays returned are kept with the design and
 * overwritten by the next call for it: copy what must outlive the caller's computation.
 */
export function mixedModelSpace(
  design: DesignMatrices, dev: ProfiledDeviance, theta: ArrayLike<number>, sigma2: number, c = crossProductOfZX(design, dev),
): MixedModelSpace | null {
  const p = design.p;
  const q = dev.q;
  const dim = q + p;
  dev.setTheta(theta);
  const ws = buffersFor(design, q, p, dev.terms.length > 1);
  // A = ΛᵀC_ZZΛ + I, then S = Λ A⁻¹ Λᵀ
  const s = ws.s;
  s.fill(0);
  if (dev.terms.length === 1) {
    blockDiagonalS(c, dim, dev, s);
  } else if (q > 0) {
    const a = ws.a;
    for (let r = 0; r < q; r++) for (let col = 0; col < q; col++) a[r * q + col] = c[r * dim + col];
    timesLambda(a, q, q, dev); // C_ZZ Λ
    // Λᵀ (C_ZZ Λ) = ((C_ZZ Λ)ᵀ Λ)ᵀ; C_ZZΛ's transpose is ΛᵀC_ZZ, so transpose, right-multiply, transpose back
    transposeInPlace(a, q);
    timesLambda(a, q, q, dev);
    transposeInPlace(a, q);
    for (let r = 0; r < q; r++) a[r * q + r] += 1;
    symmetrise(a, q);
    if (choleskyInPlace(a, q) >= 0) return null;
    inverseFromCholesky(a, q, s, ws.scratch);
    // S = Λ A⁻¹ Λᵀ = Λ (Λ A⁻¹)ᵀ
    lambdaTimes(s, q, dev);
    transposeInPlace(s, q);
    lambdaTimes(s, q, dev);
    symmetrise(s, q);
  }
  // K = [−S C_ZX; I]
  const k = ws.k;
  k.fill(0);
  for (let r = 0; r < q; r++) {
    for (let b = 0; b < p; b++) {
      let sum = 0;
      for (let col = 0; col < q; col++) sum += s[r * q + col] * c[col * dim + q + b];
      k[r * p + b] = -sum;
    }
  }
  for (let b = 0; b < p; b++) k[(q + b) * p + b] = 1;
  // J = C K
  const j = ws.j;
  j.fill(0);
  for (let r = 0; r < dim; r++) {
    const rc = r * dim;
    for (let col = 0; col < dim; col++) {
      const crc = c[rc + col];
      if (crc === 0) continue;
      for (let b = 0; b < p; b++) j[r * p + b] += crc * k[col * p + b];
    }
  }
  const jx = ws.jx;
  for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) jx[a * p + b] = 0.5 * (j[(q + a) * p + b] + j[(q + b) * p + a]);
  const u = inverseSpd(jx, p);
  if (!u) return null;
  // CS = C_{:,Z} S (D×q); B0 = C − CS C_{Z,:}
  const cs = ws.cs;
  cs.fill(0);
  for (let r = 0; r < dim; r++) {
    for (let col = 0; col < q; col++) {
      const crc = c[r * dim + col];
      if (crc === 0) continue;
      const sr = col * q;
      const out = r * q;
      for (let x = 0; x < q; x++) cs[out + x] += crc * s[sr + x];
    }
  }
  const b0 = ws.b0;
  b0.set(c);
  for (let r = 0; r < dim; r++) {
    const out = r * dim;
    for (let col = 0; col < q; col++) {
      const v = cs[r * q + col];
      if (v === 0) continue;
      const cr = col * dim;
      for (let x = 0; x < dim; x++) b0[out + x] -= v * c[cr + x];
    }
  }
  symmetrise(b0, dim);
  // B = B0 − J U Jᵀ; HC = S̃C + K U Jᵀ (S̃C's row r < q is column r of C S, i.e. cs[·][r])
  const ju = ws.ju;
  const ku = ws.ku;
  for (let r = 0; r < dim; r++) {
    for (let b = 0; b < p; b++) {
      let sj = 0;
      let sk = 0;
      for (let a = 0; a < p; a++) { sj += j[r * p + a] * u[a * p + b]; sk += k[r * p + a] * u[a * p + b]; }
      ju[r * p + b] = sj;
      ku[r * p + b] = sk;
    }
  }
  const b = ws.b;
  b.set(b0);
  const hc = ws.hc;
  for (let r = 0; r < dim; r++) {
    for (let col = 0; col < dim; col++) {
      let sb = 0;
      let sh = 0;
      for (let a = 0; a < p; a++) { sb += ju[r * p + a] * j[col * p + a]; sh += ku[r * p + a] * j[col * p + a]; }
      b[r * dim + col] -= sb;
      hc[r * dim + col] = (r < q ? cs[col * q + r] : 0) + sh;
    }
  }
  symmetrise(b, dim);
  return { q, p, dim, n: design.n, sigma2, c, s, k, j, u, b0, b, hc };
}

/**
 * One random term: ZᵀZ, A and S are block diagonal (one k×k block per level), so S is built block by
 * block in O(m k³) instead of O(q³): S_l = T (TᵀG_lT + I)⁻¹ Tᵀ with G_l the level's block of ZᵀZ.
 */
function blockDiagonalS(c: Float64Array, dim: number, dev: ProfiledDeviance, s: Float64Array): void {
  const t = dev.terms[0];
  const k = t.k;
  const T = dev.templates[0];
  const q = dev.q;
  const a = new Float64Array(k * k);
  const inv = new Float64Array(k * k);
  const ta = new Float64Array(k * k);
  for (let l = 0; l < t.m; l++) {
    const base = l * k;
    // A = Tᵀ G T + I
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        let sum = i === j ? 1 : 0;
        for (let u = i; u < k; u++) for (let v = j; v < k; v++) sum += T[u * k + i] * c[(base + u) * dim + base + v] * T[v * k + j];
        a[i * k + j] = sum;
      }
    }
    if (choleskyInPlace(a, k) >= 0) { s.fill(NaN); return; }
    inverseFromCholesky(a, k, inv);
    // S_l = T A⁻¹ Tᵀ
    for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) { let sum = 0; for (let u = 0; u <= i; u++) sum += T[i * k + u] * inv[u * k + j]; ta[i * k + j] = sum; }
    for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) { let sum = 0; for (let v = 0; v <= j; v++) sum += ta[i * k + v] * T[j * k + v]; s[(base + i) * q + base + j] = sum; }
  }
}

function transposeInPlace(a: Float64Array, n: number): void {
  for (let r = 0; r < n; r++) {
    for (let c = r + 1; c < n; c++) {
      const t = a[r * n + c];
      a[r * n + c] = a[c * n + r];
      a[c * n + r] = t;
    }
  }
}

function symmetrise(a: Float64Array, n: number): void {
  for (let r = 0; r < n; r++) {
    for (let c = r + 1; c < n; c++) {
      const v = 0.5 * (a[r * n + c] + a[c * n + r]);
      a[r * n + c] = v;
      a[c * n + r] = v;
    }
  }
}
