/**
 * Target of every coefficient of a variant in one simulated data set: the coefficients of the
 * least-squares projection of the replicate's realised mean structure onto the variant's estimable
 * fixed columns, γ = (X_eᵀX_e)⁻¹X_eᵀm. The mean structure m holds
 *   - the truth.fixed terms the variant has as columns (estimable or aliased), and those whose
 *     columns are functions of a grouping factor the variant enters as fixed (a site-level elevation
 *     with site fixed, a year-level rainfall with year fixed): such columns lie in the span of that
 *     factor's dummies, so the variant cannot tell them apart from its level effects;
 *   - the realised random effects (intercepts and slopes) of every factor the variant enters as fixed
 *     and of every factor it is nested in (plots fixed absorb their sites' effects).
 * Truth terms the variant omits and does not absorb stay out, so their omission shows as bias.
 * With OLS, E[β̂ | realised effects] = γ exactly (Gauss-Markov; e.g. Searle, Linear Models, 1971,
 * §5.2), so exact t intervals cover γ at their nominal level. With nothing absorbed, γ equals the
 * truth.fixed values; with a random factor entered as fixed and no slopes, level l gets
 * β[l] + b(l) − b(r) and the intercept β₀ + b(r); with a random slope and no x:factor product, the
 * slope of x becomes the pooled within-factor slope. Coefficients outside variant.realised keep their
 * truth.fixed value exactly (their projection equals it up to rounding).
 */
import { INTERCEPT } from '../model/terms';
import type { SimulatedData } from './simulate';
import type { ResolvedVariant, SurveyDesign, TruthTerm } from './types';
import { absorbingFactors, canonicalName } from './variants';

/** A part of an included truth term: a numeric column, or the indicator of one level of a text column. */
interface TermPart {
  column: string;
  /** null for a numeric column. */
  level: string | null;
}

interface IncludedTerm {
  value: number;
  parts: TermPart[];
}

interface AbsorbedFactor {
  factor: string;
  /** Slope covariate of term j ≥ 1 (term 0 is the intercept). */
  slopes: string[];
}

/** The parts of the projection that do not depend on the replicate, built once per scenario × variant. */
export class TargetProjector {
  /** Whether targets differ from the static truth.fixed values (otherwise `targets` copies them). */
  readonly active: boolean;
  /** truth.fixed value of each coefficient (0 where none), in variant.coefficients order. */
  readonly fixedTruth: Float64Array;
  private readonly intercept: number;
  private readonly terms: IncludedTerm[];
  private readonly factors: AbsorbedFactor[];
  private readonly out: Float64Array;
  /** 1 for coefficients whose target can move with the replicate (variant.realised); the others keep truth.fixed exactly. */
  private readonly moves: Uint8Array;
  // Workspaces, grown on demand and reused by every replicate.
  private m = new Float64Array(0);
  private gram = new Float64Array(0);
  private rhs = new Float64Array(0);
  private nz = new Int32Array(0);
  private nzValue = new Float64Array(0);
  private column = new Int32Array(0);
  private coefOfColumn = new Int32Array(0);
  private names: readonly string[] = [];

  constructor(design: SurveyDesign, readonly variant: ResolvedVariant) {
    const coefficients = variant.coefficients;
    this.fixedTruth = Float64Array.from(coefficients, (c) => variant.truth[c] ?? 0);
    this.out = new Float64Array(coefficients.length);
    this.moves = Uint8Array.from(coefficients, (c) => (variant.realised.includes(c) ? 1 : 0));
    const absorbing = absorbingFactors(design.factors, variant.fixedGroups.map((g) => g.factor));
    const own = new Set(coefficients.map(canonicalName));
    const textOf = new Map(design.covariates.filter((c) => c.kind === 'categorical').map((c) => [c.name, c.varies]));
    const numericOf = new Map(design.covariates.filter((c) => c.kind !== 'categorical').map((c) => [c.name, c.varies]));
    const isFunctionOfFixed = (t: TruthTerm): boolean =>
      t.parts.every((p) => {
        if (p.kind === 'numeric') return absorbing.has(numericOf.get(p.column) ?? '');
        return absorbing.has(p.column) || absorbing.has(textOf.get(p.column) ?? '');
      });
    let intercept = 0;
    let absorbedTerm = false;
    const terms: IncludedTerm[] = [];
    for (const t of design.truth.terms) {
      if (t.parts.length === 0) {
        intercept = t.value;
        continue;
      }
      const mine = own.has(t.canonical);
      if (!mine && !isFunctionOfFixed(t)) continue;
      if (!mine && t.value !== 0) absorbedTerm = true;
      terms.push({ value: t.value, parts: t.parts.map((p) => ({ column: p.column, level: p.kind === 'level' ? p.level : null })) });
    }
    this.intercept = intercept;
    this.terms = terms;
    this.factors = design.truth.random
      .filter((r) => absorbing.has(r.factor) && r.sd.some((s) => s > 0))
      .map((r) => ({ factor: r.factor, slopes: r.terms.slice(1) }));
    const noIntercept = !own.has(INTERCEPT) && intercept !== 0;
    // only coefficients in variant.realised take projected targets: without any, nothing to project
    this.active = variant.realised.length > 0 && (this.factors.length > 0 || absorbedTerm || noIntercept);
  }

  /**
   * Targets of the variant's coefficients for one replicate, in variant.coefficients order (a view
   * overwritten by the next call). `X` is the variant's row-major n × p fixed design built from
   * `data` (row i from data row rowIds[i]), `names` its column names, `aliased` the columns the fit
   * found not estimable; those keep their truth.fixed value. Falls back to truth.fixed values when
   * the estimable columns are numerically singular (their fit then fails as well).
   */
  targets(
    data: SimulatedData, X: Float64Array, n: number, p: number, rowIds: Int32Array, names: readonly string[], aliased: readonly string[],
  ): Float64Array {
    const out = this.out;
    out.set(this.fixedTruth);
    if (!this.active) return out;
    this.mapColumns(names, p);
    const m = this.meanStructure(data, n, rowIds);
    // Estimable columns, in design order.
    let q = 0;
    for (let j = 0; j < p; j++) if (!aliased.includes(names[j])) this.column[q++] = j;
    if (q === 0) return out;
    if (this.gram.length < q * q) {
      this.gram = new Float64Array(q * q);
      this.rhs = new Float64Array(q);
    }
    const solved = this.project(X, m, n, p, q);
    if (!solved) return out;
    for (let a = 0; a < q; a++) {
      const c = this.coefOfColumn[this.column[a]];
      if (c >= 0 && this.moves[c] === 1) out[c] = this.rhs[a];
    }
    return out;
  }

  /** Coefficient index of each design column, rebuilt only when the column names change. */
  private mapColumns(names: readonly string[], p: number): void {
    if (this.names.length === p && this.names.every((s, j) => s === names[j])) return;
    this.names = names.slice();
    this.coefOfColumn = Int32Array.from(names, (s) => this.variant.coefficients.indexOf(s));
    this.column = new Int32Array(p);
    this.nz = new Int32Array(p);
    this.nzValue = new Float64Array(p);
  }

  /** m_i: included truth terms plus absorbed realised effects, for each design row. */
  private meanStructure(data: SimulatedData, n: number, rowIds: Int32Array): Float64Array {
    if (this.m.length < n) this.m = new Float64Array(Math.max(n, 2 * this.m.length));
    const m = this.m;
    m.fill(this.intercept, 0, n);
    const cols = data.columns;
    for (const t of this.terms) {
      const beta = t.value;
      if (beta === 0) continue;
      const [a, b] = t.parts;
      for (let i = 0; i < n; i++) {
        const d = rowIds[i];
        let v = beta * partValue(cols[a.column], a.level, d);
        if (b !== undefined) v *= partValue(cols[b.column], b.level, d);
        m[i] += v;
      }
    }
    for (const f of this.factors) {
      const eff = data.effects[f.factor];
      if (eff === undefined) continue;
      const level = data.levelIndex[f.factor];
      const k = eff.terms.length;
      const values = eff.values;
      for (let i = 0; i < n; i++) m[i] += values[level[rowIds[i]] * k];
      for (let j = 1; j < k; j++) {
        const x = cols[f.slopes[j - 1]] as Float64Array;
        for (let i = 0; i < n; i++) {
          const d = rowIds[i];
          m[i] += values[level[d] * k + j] * x[d];
        }
      }
    }
    return m;
  }

  /**
   * Normal equations over the estimable columns, accumulated from each row's nonzero entries
   * (dummy columns are mostly zero), then solved by Cholesky (Golub and Van Loan, Matrix
   * Computations, 4th ed., §4.2). The solution is left in `rhs`; false when a pivot vanishes.
   */
  private project(X: Float64Array, m: Float64Array, n: number, p: number, q: number): boolean {
    const G = this.gram;
    const h = this.rhs;
    G.fill(0, 0, q * q);
    h.fill(0, 0, q);
    const col = this.column;
    const nz = this.nz;
    const nzValue = this.nzValue;
    for (let i = 0; i < n; i++) {
      const row = i * p;
      let k = 0;
      for (let a = 0; a < q; a++) {
        const v = X[row + col[a]];
        if (v !== 0) {
          nz[k] = a;
          nzValue[k++] = v;
        }
      }
      const mi = m[i];
      for (let s = 0; s < k; s++) {
        const a = nz[s];
        const va = nzValue[s];
        h[a] += va * mi;
        const base = a * q;
        for (let t = s; t < k; t++) G[base + nz[t]] += va * nzValue[t];
      }
    }
    // Cholesky, upper triangle: G = RᵀR with R stored in the upper triangle.
    let scale = 0;
    for (let a = 0; a < q; a++) scale = Math.max(scale, G[a * q + a]);
    const tol = 1e-12 * scale;
    for (let a = 0; a < q; a++) {
      let d = G[a * q + a];
      for (let c = 0; c < a; c++) d -= G[c * q + a] * G[c * q + a];
      if (!(d > tol)) return false;
      const r = Math.sqrt(d);
      G[a * q + a] = r;
      for (let b = a + 1; b < q; b++) {
        let s = G[a * q + b];
        for (let c = 0; c < a; c++) s -= G[c * q + a] * G[c * q + b];
        G[a * q + b] = s / r;
      }
    }
    // Rᵀz = h, then Rγ = z.
    for (let a = 0; a < q; a++) {
      let s = h[a];
      for (let c = 0; c < a; c++) s -= G[c * q + a] * h[c];
      h[a] = s / G[a * q + a];
    }
    for (let a = q - 1; a >= 0; a--) {
      let s = h[a];
      for (let c = a + 1; c < q; c++) s -= G[a * q + c] * h[c];
      h[a] = s / G[a * q + a];
    }
    return true;
  }
}

function partValue(column: string[] | Float64Array, level: string | null, row: number): number {
  if (level === null) return (column as Float64Array)[row];
  return (column as string[])[row] === level ? 1 : 0;
}
