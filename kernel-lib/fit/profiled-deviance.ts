import type { DesignMatrices, RandomTerm } from '../data/design-matrices';
import { choleskyInPlace, forwardSolveInPlace, backSolveTransposeInPlace, logDiagonalSum } from '../numeric/dense';
import { Float64Arena } from '../numeric/arena';
import { aliasingFromCrossProducts, restrictColumns, type AliasReport } from './aliasing';

/**
 * Profiled REML/ML deviance of a linear mixed model through penalised least squares
 * (Bates and DebRoy 2004, J. Multivariate Analysis 91:1-17; Bates et al. 2015, J. Stat. Softw.
 * 67(1), §3). Random effects b = Λ(θ) u with u ~ N(0, σ²I); Λ is block diagonal, one k×k lower
 * triangular template T per term repeated over its levels.
 *
 * Structure exploited: the term with most random effects comes first; its block of
 * ΛᵀZᵀZΛ + I is block diagonal (one k×k block per level), so its Cholesky factor is too.
 * The remaining terms form one dense block. Everything is computed from cross-products
 * (ZᵀZ, Zᵀ[X y], [X y]ᵀ[X y]) built once, so an evaluation costs the same whatever n,
 * and a new response only refreshes the y column of the cross-products.
 */

/** Where each covariance parameter sits in a term's template T. */
export interface TermLayout {
  term: RandomTerm;
  k: number;
  m: number;
  /** First row of this term in u. */
  start: number;
  /** First θ index of this term. */
  thetaStart: number;
  /** Number of θ entries: k(k+1)/2 when correlated, else k. */
  thetaCount: number;
}

function samePriority(a: number[] | undefined, b: number[] | undefined): boolean {
  if (a === undefined || b === undefined) return a === b;
  return a.length === b.length && a.every((v, i) => v === b[i]);
}

/** Engines kept per design object, [ML, REML]; dropped with the design. */
const engines = new WeakMap<DesignMatrices, [ProfiledDeviance | null, ProfiledDeviance | null]>();

export class ProfiledDeviance {
  /** Observations: changes only when a refilled design is rebound (see rebind). */
  n: number;
  readonly p: number;
  /** Width of the augmented [X y] block. */
  readonly w: number;
  readonly terms: TermLayout[];
  /** Position in `terms` (the engine's order) of each of the design's random terms. */
  readonly termIndex: Map<RandomTerm, number>;
  readonly q: number;
  readonly q1: number;
  readonly q2: number;
  readonly k1: number;
  readonly m1: number;
  readonly thetaLength: number;
  readonly lowerBounds: Float64Array;
  readonly reml: boolean;

  // cross-products that depend on the design only
  private readonly g1: Float64Array; // m1 blocks of k1×k1: Z1ᵀZ1 per level
  private readonly z2z1: Float64Array; // q2 × q1
  private readonly z2z2: Float64Array; // q2 × q2
  // cross-products that involve the response
  private readonly zxy: Float64Array; // q × w
  private readonly xyxy: Float64Array; // w × w
  // workspaces, reused across evaluations
  readonly templates: Float64Array[]; // per term k×k lower triangular T
  readonly l11: Float64Array;
  readonly l21: Float64Array;
  readonly l22: Float64Array;
  readonly r: Float64Array; // q × w
  readonly m: Float64Array; // w × w
  private readonly block: Float64Array;
  private design: DesignMatrices;
  /** The design this engine was built for (setResponse swaps `design` for a copy with another y). */
  private readonly source: DesignMatrices;
  /** Held by a fit (acquire … release); a busy engine is never handed out again. */
  inUse = false;
  /** Counts the fits that took this engine, so a fit's later work can tell whether another fit came between. */
  generation = 0;
  /** The design's `revision` the design-only products were built from. */
  private revision: number;
  /** The last evaluation failed a factorisation (reported, not thrown). */
  lastFailure = '';
  /** Every term has one column (random intercepts only): Λ is diagonal. */
  private readonly allScalar: boolean;
  /** For rows of the dense block: θ index of the term each row belongs to. */
  private readonly rowTheta2: Int32Array;
  private readonly lambda2: Float64Array;
  /**
   * Random intercepts only: for each row a of the dense block, the first-term levels it shares
   * observations with (nonzero Z2ᵀZ1 entries), as CSR lists. L21 is zero elsewhere, so nested
   * designs (sites over plots) touch a few entries per row instead of every plot.
   */
  private nzStart: Int32Array = new Int32Array(1);
  private nzCols: Int32Array = new Int32Array(0);
  private estimable: { priority: number[] | undefined; alias: AliasReport; reduced: DesignMatrices } | null = null;
  /** Output buffers of randomEffects and inverseDiagonalBlocks, made on first use. */
  private effects: { u: Float64Array; b: Float64Array } | null = null;
  private inverse: {
    out: Float64Array[]; w11: Float64Array; col: Float64Array; w21: Float64Array; colq: Float64Array; w22: Float64Array; e: Float64Array;
  } | null = null;

  constructor(design: DesignMatrices, reml: boolean) {
    this.design = design;
    this.source = design;
    this.revision = design.revision ?? 0;
    this.reml = reml;
    this.n = design.n;
    this.p = design.p;
    this.w = design.p + 1;
    const ordered = design.random
      .map((term, i) => ({ term, i, size: term.levels.length * term.terms.length }))
      .sort((a, b) => b.size - a.size || a.i - b.i);
    let start = 0;
    let thetaStart = 0;
    this.terms = ordered.map(({ term }) => {
      const k = term.terms.length;
      const thetaCount = term.correlated ? (k * (k + 1)) / 2 : k;
      const layout: TermLayout = { term, k, m: term.levels.length, start, thetaStart, thetaCount };
      start += k * term.levels.length;
      thetaStart += thetaCount;
      return layout;
    });
    this.q = start;
    this.thetaLength = thetaStart;
    this.termIndex = new Map(this.terms.map((t, s) => [t.term, s]));
    this.k1 = this.terms.length ? this.terms[0].k : 0;
    this.m1 = this.terms.length ? this.terms[0].m : 0;
    this.q1 = this.k1 * this.m1;
    this.q2 = this.q - this.q1;
    const { q1: Q1, q2: Q2, k1: K1, m1: M1, q: Q, w: W } = this;
    const templateSize = this.terms.reduce((a, t) => a + t.k * t.k, 0);
    const arena = new Float64Arena(
      this.thetaLength + 2 * M1 * K1 * K1 + 2 * Q2 * Q1 + 2 * Q2 * Q2 + 2 * Q * W + 2 * W * W + templateSize + Math.max(1, K1 * K1) + Q2,
    );
    this.lowerBounds = arena.take(this.thetaLength);
    for (const t of this.terms) {
      let idx = t.thetaStart;
      if (t.term.correlated) {
        for (let j = 0; j < t.k; j++) for (let i = j; i < t.k; i++) this.lowerBounds[idx++] = i === j ? 0 : -Infinity;
      } else {
        for (let j = 0; j < t.k; j++) this.lowerBounds[idx++] = 0;
      }
    }
    const { q1, q2, k1, m1, q, w } = this;
    this.g1 = arena.take(m1 * k1 * k1);
    this.z2z1 = arena.take(q2 * q1);
    this.z2z2 = arena.take(q2 * q2);
    this.zxy = arena.take(q * w);
    this.xyxy = arena.take(w * w);
    this.templates = this.terms.map((t) => arena.take(t.k * t.k));
    this.l11 = arena.take(m1 * k1 * k1);
    this.l21 = arena.take(q2 * q1);
    this.l22 = arena.take(q2 * q2);
    this.r = arena.take(q * w);
    this.m = arena.take(w * w);
    this.block = arena.take(Math.max(1, k1 * k1));
    this.allScalar = this.terms.every((t) => t.k === 1);
    this.rowTheta2 = new Int32Array(this.q2);
    for (let s = 1; s < this.terms.length; s++) {
      const t = this.terms[s];
      for (let r = t.start - this.q1; r < t.start - this.q1 + t.m * t.k; r++) this.rowTheta2[r] = t.thetaStart;
    }
    this.lambda2 = arena.take(this.q2);
    this.buildDesignProducts();
    this.buildResponseProducts();
    if (this.allScalar) this.indexDenseBlockPattern();
  }

  private indexDenseBlockPattern(): void {
    const { q1, q2 } = this;
    const start = new Int32Array(q2 + 1);
    const cols: number[] = [];
    for (let a = 0; a < q2; a++) {
      for (let l = 0; l < q1; l++) if (this.z2z1[a * q1 + l] !== 0) cols.push(l);
      start[a + 1] = cols.length;
    }
    this.nzStart = start;
    this.nzCols = Int32Array.from(cols);
  }

  /** Replace the response (same design): refresh only the cross-products that involve y. */
  setResponse(y: Float64Array): void {
    if (y.length !== this.n) throw new RangeError(`response has ${y.length} values, the design has ${this.n} observations`);
    this.design = { ...this.design, y };
    this.buildResponseProducts(true);
  }

  /**
   * Start a new fit of the design this engine was built for: read its current y again (the caller
   * may have replaced the response values) and clear the failure note. The design-only products stay.
   */
  private refreshForNewFit(): void {
    this.design = this.source;
    this.lastFailure = '';
    this.buildResponseProducts(true);
  }

  /**
   * An engine for `design`, reusing the one kept for that design object when it is free: the
   * cross-products of X and Z, the sparsity pattern and every workspace are built once per design,
   * and a fit only refreshes the response column. A design's X and random terms are therefore taken
   * as fixed once fitted (DesignMatrices: in a study only y changes). Hand it back with release().
   */
  static acquire(design: DesignMatrices, reml: boolean): ProfiledDeviance {
    let kept = engines.get(design);
    if (!kept) { kept = [null, null]; engines.set(design, kept); }
    const slot = reml ? 1 : 0;
    const dev = kept[slot];
    if (dev && !dev.inUse && dev.revision !== (design.revision ?? 0)) dev.rebind();
    if (dev && !dev.inUse && dev.revision === (design.revision ?? 0) && dev.n === design.y.length) {
      dev.refreshForNewFit();
      dev.inUse = true;
      dev.generation++;
      return dev;
    }
    const fresh = new ProfiledDeviance(design, reml);
    // a busy engine (a fit inside a fit of the same design) stays kept; the fresh one is used once
    if (!dev || !dev.inUse) kept[slot] = fresh;
    fresh.inUse = true;
    return fresh;
  }

  /**
   * The design was refilled in place (X, n or the random terms' values; same columns, terms and
   * levels): rebuild every product and forget the estimable columns, as a new engine would.
   * A design whose shape changed is left alone (acquire then builds a new engine).
   */
  private rebind(): void {
    const d = this.source;
    const sameShape = d.p === this.p && d.random.length === this.terms.length
      && this.terms.every((t) => this.termIndex.has(t.term) && t.term.levels.length === t.m && t.term.terms.length === t.k);
    if (!sameShape) return;
    this.n = d.n;
    this.revision = d.revision ?? 0;
    this.design = d;
    this.estimable = null;
    // a new engine's workspaces start at zero, and some entries outside the sparsity pattern are never written
    for (const a of [this.l11, this.l21, this.l22, this.r, this.m, this.block, this.lambda2, ...this.templates]) a.fill(0);
    if (this.effects) { this.effects.u.fill(0); this.effects.b.fill(0); }
    if (this.inverse) {
      const v = this.inverse;
      for (const a of [...v.out, v.w11, v.col, v.w21, v.colq, v.w22, v.e]) a.fill(0);
    }
    this.buildDesignProducts();
    this.buildResponseProducts();
    if (this.allScalar) this.indexDenseBlockPattern();
  }

  /**
   * Estimable columns of X (visited in `priority` order) and the design restricted to them. Both
   * depend on X only, so an engine kept for its design computes them once per priority order.
   */
  estimableColumns(priority?: number[]): { alias: AliasReport; reduced: DesignMatrices } {
    const kept = this.estimable;
    if (kept && samePriority(kept.priority, priority)) {
      // the restricted copy follows the design's current response
      if (kept.reduced !== this.source && kept.reduced.y !== this.source.y) kept.reduced.y = this.source.y;
      return kept;
    }
    const alias = aliasingFromCrossProducts(this.xyxy, this.p, this.w, priority);
    const reduced = restrictColumns(this.source, alias.estimable);
    this.estimable = { priority: priority ? priority.slice() : undefined, alias, reduced };
    return this.estimable;
  }

  /** Hand an engine from acquire() back, so the next fit of its design can reuse it. */
  release(): void {
    this.inUse = false;
  }

  /** [X y]ᵀ[X y] (w×w, row-major, full); its leading p×p block is XᵀX. */
  crossProducts(): Float64Array {
    return this.xyxy;
  }

  /** Starting θ: identity templates (random-effect SD equal to the residual SD). */
  initialTheta(): Float64Array {
    const theta = new Float64Array(this.thetaLength);
    for (const t of this.terms) {
      let idx = t.thetaStart;
      if (t.term.correlated) {
        for (let j = 0; j < t.k; j++) for (let i = j; i < t.k; i++) theta[idx++] = i === j ? 1 : 0;
      } else {
        for (let j = 0; j < t.k; j++) theta[idx++] = 1;
      }
    }
    return theta;
  }

  /**
   * Starting θ from moments when every term is a random intercept: per factor, the spread of the
   * level means of the least-squares residuals beyond what the residual variance explains
   * (the one-way ANOVA estimator, Searle, Casella and McCulloch 1992, §3.5), floored at 0.1 so the
   * simplex can still move. Falls back to identity templates otherwise.
   */
  momentTheta(): Float64Array {
    const theta = this.initialTheta();
    if (!this.allScalar || !this.terms.length) return theta;
    const { p, w, n } = this;
    // least squares at θ = 0: factor [X y]ᵀ[X y] into the workspace
    const M = this.m;
    M.set(this.xyxy);
    if (choleskyInPlace(M, w) >= 0 || n - p < 1) return theta;
    const beta = this.beta();
    const rss = M[p * w + p] * M[p * w + p];
    const sigma2 = rss / (n - p);
    if (!(sigma2 > 0)) return theta;
    for (let s = 0; s < this.terms.length; s++) {
      const t = this.terms[s];
      let sumMeans = 0;
      let sumSq = 0;
      let sumInvN = 0;
      let levels = 0;
      for (let l = 0; l < t.m; l++) {
        const row = t.start + l;
        const count = s === 0 ? this.g1[l] : this.z2z2[(row - this.q1) * this.q2 + (row - this.q1)];
        if (!(count > 0)) continue;
        let e = this.zxy[row * w + p];
        for (let a = 0; a < p; a++) e -= this.zxy[row * w + a] * beta[a];
        const mean = e / count;
        sumMeans += mean;
        sumSq += mean * mean;
        sumInvN += 1 / count;
        levels++;
      }
      if (levels < 2) continue;
      const varMeans = (sumSq - (sumMeans * sumMeans) / levels) / (levels - 1);
      const between = varMeans - (sigma2 * sumInvN) / levels;
      theta[t.thetaStart] = Math.max(0.1, Math.sqrt(Math.max(0, between) / sigma2));
    }
    return theta;
  }

  private columnIndexOfLevelRow(t: TermLayout, level: number, j: number): number {
    return t.start + level * t.k + j;
  }

  private buildDesignProducts(): void {
    const { n, terms, q1, q2, k1 } = this;
    this.g1.fill(0);
    this.z2z1.fill(0);
    this.z2z2.fill(0);
    if (!terms.length) return;
    const t1 = terms[0];
    const index1 = t1.term.index;
    const v1 = t1.term.values;
    const g1 = this.g1;
    for (let i = 0; i < n; i++) {
      const l1 = index1[i];
      const g = l1 * k1 * k1;
      for (let a = 0; a < k1; a++) {
        const za = v1[i * k1 + a];
        for (let b = 0; b <= a; b++) g1[g + a * k1 + b] += za * v1[i * k1 + b];
      }
      for (let s = 1; s < terms.length; s++) {
        const ts = terms[s];
        const ls = ts.term.index[i];
        for (let a = 0; a < ts.k; a++) {
          const za = ts.term.values[i * ts.k + a];
          if (za === 0) continue;
          const row = this.columnIndexOfLevelRow(ts, ls, a) - q1;
          for (let b = 0; b < k1; b++) this.z2z1[row * q1 + l1 * k1 + b] += za * v1[i * k1 + b];
          for (let s2 = 1; s2 <= s; s2++) {
            const tt = terms[s2];
            const lt = tt.term.index[i];
            for (let b = 0; b < tt.k; b++) {
              const col = this.columnIndexOfLevelRow(tt, lt, b) - q1;
              if (col > row) continue;
              this.z2z2[row * q2 + col] += za * tt.term.values[i * tt.k + b];
            }
          }
        }
      }
    }
    // symmetrise the blocks we filled in the lower triangle
    for (let l = 0; l < this.m1; l++) {
      const g = l * k1 * k1;
      for (let a = 0; a < k1; a++) for (let b = a + 1; b < k1; b++) this.g1[g + a * k1 + b] = this.g1[g + b * k1 + a];
    }
    for (let a = 0; a < q2; a++) for (let b = a + 1; b < q2; b++) this.z2z2[a * q2 + b] = this.z2z2[b * q2 + a];
  }

  /**
   * [X y]ᵀ[X y] and Zᵀ[X y]. With `responseOnly`, only the y column of each is refreshed
   * (a simulation replicate with the same design). Hand-inlined loops over hoisted locals: this runs
   * once per replicate over every observation.
   */
  private buildResponseProducts(responseOnly = false): void {
    const { n, p, w, terms } = this;
    const { X, y } = this.design;
    const xy = this.xyxy;
    const zxy = this.zxy;
    const rowY = p * w;
    if (responseOnly) {
      for (let c = 0; c < this.q; c++) zxy[c * w + p] = 0;
    } else {
      zxy.fill(0);
    }
    // column pairs as long strided dot products: far faster than a row loop with tiny inner loops
    for (let a = 0; a < p; a++) {
      if (!responseOnly) {
        for (let b = 0; b <= a; b++) {
          let sum = 0;
          for (let i = 0, r = 0; i < n; i++, r += p) sum += X[r + a] * X[r + b];
          xy[a * w + b] = sum;
        }
      }
      let sy = 0;
      for (let i = 0, r = 0; i < n; i++, r += p) sy += y[i] * X[r + a];
      xy[rowY + a] = sy;
    }
    let yy = 0;
    for (let i = 0; i < n; i++) yy += y[i] * y[i];
    xy[rowY + p] = yy;
    for (let a = 0; a < w; a++) for (let b = a + 1; b < w; b++) xy[a * w + b] = xy[b * w + a];
    for (let s = 0; s < terms.length; s++) {
      const t = terms[s];
      const index = t.term.index;
      const values = t.term.values;
      const k = t.k;
      const start = t.start;
      if (k === 1) {
        for (let i = 0; i < n; i++) {
          const z = values[i];
          if (z === 0) continue;
          const row = (start + index[i]) * w;
          if (!responseOnly) {
            const r = i * p;
            for (let b = 0; b < p; b++) zxy[row + b] += z * X[r + b];
          }
          zxy[row + p] += z * y[i];
        }
        continue;
      }
      for (let i = 0; i < n; i++) {
        const base = (start + index[i] * k) * w;
        const r = i * p;
        const yi = y[i];
        for (let j = 0; j < k; j++) {
          const z = values[i * k + j];
          if (z === 0) continue;
          const row = base + j * w;
          if (!responseOnly) for (let b = 0; b < p; b++) zxy[row + b] += z * X[r + b];
          zxy[row + p] += z * yi;
        }
      }
    }
  }

  /** Fill the per-term templates T from θ. */
  setTheta(theta: ArrayLike<number>): void {
    for (let s = 0; s < this.terms.length; s++) {
      const t = this.terms[s];
      const T = this.templates[s];
      T.fill(0);
      let idx = t.thetaStart;
      if (t.term.correlated) {
        for (let j = 0; j < t.k; j++) for (let i = j; i < t.k; i++) T[i * t.k + j] = theta[idx++];
      } else {
        for (let j = 0; j < t.k; j++) T[j * t.k + j] = theta[idx++];
      }
    }
  }

  /**
   * Overwrite rows [rowStart, rowStart + rows) of a row-major matrix (row stride `stride`, `cols` columns)
   * by Λᵀ times those rows, term by term. In place: row j of a block uses rows j..k-1, so ascending j is safe.
   */
  private applyLambdaTransposeLeft(a: Float64Array, stride: number, cols: number, firstTerm: number, rowOffset: number): void {
    for (let s = firstTerm; s < this.terms.length; s++) {
      const t = this.terms[s];
      const T = this.templates[s];
      const k = t.k;
      for (let l = 0; l < t.m; l++) {
        const base = t.start + l * k - rowOffset;
        for (let j = 0; j < k; j++) {
          const rj = (base + j) * stride;
          const tjj = T[j * k + j];
          for (let c = 0; c < cols; c++) {
            let sum = tjj * a[rj + c];
            for (let jp = j + 1; jp < k; jp++) sum += T[jp * k + j] * a[(base + jp) * stride + c];
            a[rj + c] = sum;
          }
        }
      }
    }
  }

  /** Overwrite columns by (matrix)·Λ for the terms from firstTerm on; columns shifted by colOffset. */
  private applyLambdaRight(a: Float64Array, stride: number, rows: number, firstTerm: number, lastTerm: number, colOffset: number): void {
    for (let s = firstTerm; s <= lastTerm; s++) {
      const t = this.terms[s];
      const T = this.templates[s];
      const k = t.k;
      for (let l = 0; l < t.m; l++) {
        const base = t.start + l * k - colOffset;
        for (let j = 0; j < k; j++) {
          const tjj = T[j * k + j];
          for (let r = 0; r < rows; r++) {
            const rr = r * stride;
            let sum = tjj * a[rr + base + j];
            for (let jp = j + 1; jp < k; jp++) sum += a[rr + base + jp] * T[jp * k + j];
            a[rr + base + j] = sum;
          }
        }
      }
    }
  }

  /**
   * Factor the penalised system at θ. Returns false (with lastFailure set) when a factorisation
   * fails, which for a valid θ only happens when [X y] is numerically degenerate.
   */
  factor(theta: ArrayLike<number>): boolean {
    this.setTheta(theta);
    const { q1, q2, k1, m1, w, terms } = this;
    const nTerms = terms.length;
    if (this.allScalar) return this.factorScalarTerms(theta);
    if (nTerms) {
      // L11: per level, T1ᵀ G T1 + I
      const T1 = this.templates[0];
      const blk = this.block;
      for (let l = 0; l < m1; l++) {
        const g = l * k1 * k1;
        // blk = G T1
        for (let a = 0; a < k1; a++) {
          for (let b = 0; b < k1; b++) {
            let s = 0;
            for (let c = b; c < k1; c++) s += this.g1[g + a * k1 + c] * T1[c * k1 + b];
            blk[a * k1 + b] = s;
          }
        }
        // L11 block = T1ᵀ (G T1) + I
        for (let a = 0; a < k1; a++) {
          for (let b = 0; b <= a; b++) {
            let s = a === b ? 1 : 0;
            for (let c = a; c < k1; c++) s += T1[c * k1 + a] * blk[c * k1 + b];
            this.l11[g + a * k1 + b] = s;
          }
        }
        if (choleskyInPlace(this.l11, k1, k1, g) >= 0) { this.lastFailure = 'random-effects block not positive definite'; return false; }
      }
      if (q2 > 0) {
        // L21 = Λ2ᵀ Z2ᵀZ1 Λ1 L11⁻ᵀ
        this.l21.set(this.z2z1);
        this.applyLambdaTransposeLeft(this.l21, q1, q1, 1, q1);
        this.applyLambdaRight(this.l21, q1, q2, 0, 0, 0);
        for (let r = 0; r < q2; r++) {
          for (let l = 0; l < m1; l++) forwardSolveInPlace(this.l11, k1, this.l21, k1, l * k1 * k1, r * q1 + l * k1);
        }
        // L22 = chol(Λ2ᵀ Z2ᵀZ2 Λ2 + I − L21 L21ᵀ)
        this.l22.set(this.z2z2);
        this.applyLambdaTransposeLeft(this.l22, q2, q2, 1, q1);
        this.applyLambdaRight(this.l22, q2, q2, 1, nTerms - 1, q1);
        for (let a = 0; a < q2; a++) {
          const ra = a * q1;
          for (let b = 0; b <= a; b++) {
            const rb = b * q1;
            let s = this.l22[a * q2 + b];
            for (let c = 0; c < q1; c++) s -= this.l21[ra + c] * this.l21[rb + c];
            this.l22[a * q2 + b] = a === b ? s + 1 : s;
          }
        }
        if (choleskyInPlace(this.l22, q2) >= 0) { this.lastFailure = 'random-effects block not positive definite'; return false; }
      }
      // R = L⁻¹ Λᵀ Zᵀ[X y]
      this.r.set(this.zxy);
      this.applyLambdaTransposeLeft(this.r, w, w, 0, 0);
      for (let l = 0; l < m1; l++) {
        for (let c = 0; c < w; c++) {
          // forward solve on a strided column: small k1, do it inline
          for (let a = 0; a < k1; a++) {
            const la = l * k1 * k1 + a * k1;
            let s = this.r[(l * k1 + a) * w + c];
            for (let b = 0; b < a; b++) s -= this.l11[la + b] * this.r[(l * k1 + b) * w + c];
            this.r[(l * k1 + a) * w + c] = s / this.l11[la + a];
          }
        }
      }
      if (q2 > 0) {
        for (let a = 0; a < q2; a++) {
          const ra = a * q1;
          for (let c = 0; c < w; c++) {
            let s = this.r[(q1 + a) * w + c];
            for (let b = 0; b < q1; b++) s -= this.l21[ra + b] * this.r[b * w + c];
            this.r[(q1 + a) * w + c] = s;
          }
        }
        for (let c = 0; c < w; c++) {
          for (let a = 0; a < q2; a++) {
            let s = this.r[(q1 + a) * w + c];
            for (let b = 0; b < a; b++) s -= this.l22[a * q2 + b] * this.r[(q1 + b) * w + c];
            this.r[(q1 + a) * w + c] = s / this.l22[a * q2 + a];
          }
        }
      }
    }
    return this.factorFixedBlock();
  }

  /**
   * M = [X y]ᵀ[X y] − RᵀR and its Cholesky factor, which holds RX, cβ and the penalised residual r
   * (the last block of the augmented PLS factorisation; Bates and DebRoy 2004, §2).
   */
  private factorFixedBlock(): boolean {
    const { w, q } = this;
    const M = this.m;
    const r = this.r;
    const xyxy = this.xyxy;
    for (let a = 0; a < w; a++) {
      for (let b = 0; b <= a; b++) {
        let sum = xyxy[a * w + b];
        for (let c = 0; c < q; c++) sum -= r[c * w + a] * r[c * w + b];
        M[a * w + b] = sum;
      }
    }
    return this.choleskyOfFixedBlock();
  }

  private choleskyOfFixedBlock(): boolean {
    const bad = choleskyInPlace(this.m, this.w);
    if (bad >= 0) {
      // a zero last pivot means a perfect fit (residual sum of squares 0)
      this.lastFailure = bad === this.w - 1 ? 'the model fits the response exactly (zero residual variance)' : 'fixed-effect block not positive definite';
      return false;
    }
    this.lastFailure = '';
    return true;
  }

  /**
   * Random intercepts only (every template is a scalar θₛ, so Λ is diagonal): the general block
   * factorisation written out with k = 1, without per-level calls. Same layout of L11, L21, L22, R.
   */
  private factorScalarTerms(theta: ArrayLike<number>): boolean {
    const { q1, q2, w } = this;
    const g1 = this.g1, z2z1 = this.z2z1, z2z2 = this.z2z2, zxy = this.zxy;
    const l11 = this.l11, l21 = this.l21, l22 = this.l22, r = this.r;
    const lam2 = this.lambda2;
    const lam1 = theta[0];
    for (let a = 0; a < q2; a++) lam2[a] = theta[this.rowTheta2[a]];
    for (let l = 0; l < q1; l++) {
      const ll = Math.sqrt(lam1 * lam1 * g1[l] + 1);
      l11[l] = ll;
      const f = lam1 / ll;
      const row = l * w;
      for (let c = 0; c < w; c++) r[row + c] = f * zxy[row + c];
    }
    const nzStart = this.nzStart;
    const nzCols = this.nzCols;
    for (let a = 0; a < q2; a++) {
      const ra = a * q1;
      const fa = lam2[a] * lam1;
      for (let k = nzStart[a]; k < nzStart[a + 1]; k++) {
        const l = nzCols[k];
        l21[ra + l] = (fa * z2z1[ra + l]) / l11[l];
      }
    }
    for (let a = 0; a < q2; a++) {
      const ra = a * q1;
      for (let b = 0; b <= a; b++) {
        const rb = b * q1;
        let sum = lam2[a] * lam2[b] * z2z2[a * q2 + b];
        for (let k = nzStart[a]; k < nzStart[a + 1]; k++) {
          const l = nzCols[k];
          sum -= l21[ra + l] * l21[rb + l];
        }
        l22[a * q2 + b] = a === b ? sum + 1 : sum;
      }
    }
    if (choleskyInPlace(l22, q2) >= 0) { this.lastFailure = 'random-effects block not positive definite'; return false; }
    for (let a = 0; a < q2; a++) {
      const ra = a * q1;
      const rowA = (q1 + a) * w;
      for (let c = 0; c < w; c++) {
        let sum = lam2[a] * zxy[rowA + c];
        for (let k = nzStart[a]; k < nzStart[a + 1]; k++) {
          const l = nzCols[k];
          sum -= l21[ra + l] * r[l * w + c];
        }
        for (let b = 0; b < a; b++) sum -= l22[a * q2 + b] * r[(q1 + b) * w + c];
        r[rowA + c] = sum / l22[a * q2 + a];
      }
    }
    return this.factorFixedBlock();
  }

  /** log|L|² (twice the sum of log diagonal of the random-effects factor). */
  logDetL(): number {
    // diagonal entries of L are ≥ 1: multiply them and take one log per block of products
    // (far fewer Math.log calls), flushing before the product could overflow
    let s = 0;
    let prod = 1;
    const { k1, m1, q2 } = this;
    const l11 = this.l11;
    const l22 = this.l22;
    for (let l = 0; l < m1; l++) {
      for (let a = 0; a < k1; a++) {
        prod *= l11[l * k1 * k1 + a * k1 + a];
        if (prod > 1e200) { s += Math.log(prod); prod = 1; }
      }
    }
    for (let a = 0; a < q2; a++) {
      prod *= l22[a * q2 + a];
      if (prod > 1e200) { s += Math.log(prod); prod = 1; }
    }
    return 2 * (s + Math.log(prod));
  }

  /** log|RX|² from the last factorisation. */
  logDetRX(): number {
    return 2 * logDiagonalSum(this.m, this.p, this.w);
  }

  /** Penalised residual sum of squares r² from the last factorisation. */
  penalisedRss(): number {
    const r = this.m[this.p * this.w + this.p];
    return r * r;
  }

  /** Profiled deviance at θ: REML criterion or −2 log-likelihood (Bates et al. 2015, §3.4). */
  evaluate(theta: ArrayLike<number>): number {
    if (!this.factor(theta)) return Infinity;
    const { n, p } = this;
    const r2 = this.penalisedRss();
    if (this.reml) {
      const dof = n - p;
      return this.logDetL() + this.logDetRX() + dof * (1 + Math.log((2 * Math.PI * r2) / dof));
    }
    return this.logDetL() + n * (1 + Math.log((2 * Math.PI * r2) / n));
  }

  /** Residual variance estimate at the last factorisation. */
  sigma2(): number {
    return this.penalisedRss() / (this.reml ? this.n - this.p : this.n);
  }

  /** Fixed effects β = RX⁻¹ cβ from the last factorisation. */
  beta(out: Float64Array = new Float64Array(this.p)): Float64Array {
    const { p, w } = this;
    for (let a = 0; a < p; a++) out[a] = this.m[p * w + a];
    backSolveTransposeInPlace(this.m, p, out, w);
    return out;
  }

  /**
   * (RXᵀRX)⁻¹ (p×p), to be scaled by σ² for the fixed-effect covariance. Callers that repeat this
   * (finite differences) pass their own `out` (p×p) and `col` (p) buffers.
   */
  unscaledFixedCovariance(out: Float64Array = new Float64Array(this.p * this.p), col: Float64Array = new Float64Array(this.p)): Float64Array {
    const { p, w } = this;
    for (let j = 0; j < p; j++) {
      col.fill(0);
      col[j] = 1;
      forwardSolveInPlace(this.m, p, col, w);
      backSolveTransposeInPlace(this.m, p, col, w);
      for (let i = 0; i < p; i++) out[i * p + j] = col[i];
    }
    return out;
  }

  /**
   * Spherical random effects u = L⁻ᵀ(cu − RZX β) and b = Λu, in the engine's term order. Written
   * to buffers the engine keeps, so they are overwritten by the next call: copy what must outlive it.
   */
  randomEffects(beta: Float64Array): { u: Float64Array; b: Float64Array } {
    const { q, q1, q2, k1, m1, w, p } = this;
    if (!this.effects) {
      const buffer = new Float64Array(2 * q);
      this.effects = { u: buffer.subarray(0, q), b: buffer.subarray(q) };
    }
    const { u, b } = this.effects;
    for (let c = 0; c < q; c++) {
      let s = this.r[c * w + p];
      for (let a = 0; a < p; a++) s -= this.r[c * w + a] * beta[a];
      u[c] = s;
    }
    if (q2 > 0) {
      backSolveTransposeInPlace(this.l22, q2, u, q2, 0, q1);
      for (let c = 0; c < q1; c++) {
        let s = u[c];
        for (let a = 0; a < q2; a++) s -= this.l21[a * q1 + c] * u[q1 + a];
        u[c] = s;
      }
    }
    for (let l = 0; l < m1; l++) backSolveTransposeInPlace(this.l11, k1, u, k1, l * k1 * k1, l * k1);
    this.spreadInto(u, b);
    return this.effects;
  }

  /** b = Λ(θ)u in the engine's term order, from the current templates. */
  spreadInto(u: Float64Array, b: Float64Array): void {
    for (let s = 0; s < this.terms.length; s++) {
      const t = this.terms[s];
      const T = this.templates[s];
      for (let l = 0; l < t.m; l++) {
        const base = t.start + l * t.k;
        for (let i = 0; i < t.k; i++) {
          let sum = 0;
          for (let j = 0; j <= i; j++) sum += T[i * t.k + j] * u[base + j];
          b[base + i] = sum;
        }
      }
    }
  }

  /**
   * Diagonal k×k blocks of (ΛᵀZᵀZΛ + I)⁻¹ per term and level, via W = L⁻¹ in block form
   * (W11 = L11⁻¹, W21 = −L22⁻¹ L21 L11⁻¹, W22 = L22⁻¹; A⁻¹ = WᵀW).
   * Returned in term order: blocks[s][l*k*k + a*k + b], in buffers the engine keeps (overwritten by the
   * next call).
   */
  inverseDiagonalBlocks(): Float64Array[] {
    const { q1, q2, k1, m1, terms } = this;
    const ws = this.inverseWorkspace();
    const out = ws.out;
    if (!terms.length) return out;
    // W11 per level
    const w11 = ws.w11;
    const col = ws.col;
    for (let l = 0; l < m1; l++) {
      for (let j = 0; j < k1; j++) {
        col.fill(0, 0, k1);
        col[j] = 1;
        forwardSolveInPlace(this.l11, k1, col, k1, l * k1 * k1, 0);
        for (let i = 0; i < k1; i++) w11[l * k1 * k1 + i * k1 + j] = col[i];
      }
    }
    let w21: Float64Array | null = null;
    if (q2 > 0) {
      // C = L21 W11 (q2 × q1), then W21 = −L22⁻¹ C column by column
      w21 = ws.w21;
      for (let r = 0; r < q2; r++) {
        for (let l = 0; l < m1; l++) {
          for (let j = 0; j < k1; j++) {
            let s = 0;
            for (let a = j; a < k1; a++) s += this.l21[r * q1 + l * k1 + a] * w11[l * k1 * k1 + a * k1 + j];
            w21[r * q1 + l * k1 + j] = s;
          }
        }
      }
      const colq = ws.colq;
      for (let c = 0; c < q1; c++) {
        for (let r = 0; r < q2; r++) colq[r] = w21[r * q1 + c];
        forwardSolveInPlace(this.l22, q2, colq, q2);
        for (let r = 0; r < q2; r++) w21[r * q1 + c] = -colq[r];
      }
    }
    const first = out[0];
    for (let l = 0; l < m1; l++) {
      for (let a = 0; a < k1; a++) {
        for (let b = 0; b < k1; b++) {
          let s = 0;
          for (let c = 0; c < k1; c++) s += w11[l * k1 * k1 + c * k1 + a] * w11[l * k1 * k1 + c * k1 + b];
          if (w21) for (let r = 0; r < q2; r++) s += w21[r * q1 + l * k1 + a] * w21[r * q1 + l * k1 + b];
          first[l * k1 * k1 + a * k1 + b] = s;
        }
      }
    }
    if (q2 > 0) {
      // W22ᵀW22 restricted to diagonal blocks: columns of W22 = L22⁻¹
      const w22 = ws.w22;
      const e = ws.e;
      for (let j = 0; j < q2; j++) {
        e.fill(0);
        e[j] = 1;
        forwardSolveInPlace(this.l22, q2, e, q2);
        for (let i = 0; i < q2; i++) w22[i * q2 + j] = e[i];
      }
      for (let s = 1; s < terms.length; s++) {
        const t = terms[s];
        for (let l = 0; l < t.m; l++) {
          const base = t.start + l * t.k - q1;
          for (let a = 0; a < t.k; a++) {
            for (let b = 0; b < t.k; b++) {
              let sum = 0;
              for (let r = 0; r < q2; r++) sum += w22[r * q2 + base + a] * w22[r * q2 + base + b];
              out[s][l * t.k * t.k + a * t.k + b] = sum;
            }
          }
        }
      }
    }
    return out;
  }

  /** Buffers of inverseDiagonalBlocks, carved from one allocation the first time they are needed. */
  private inverseWorkspace(): NonNullable<ProfiledDeviance['inverse']> {
    if (this.inverse) return this.inverse;
    const { q1, q2, k1, m1, terms } = this;
    const arena = new Float64Arena(terms.reduce((a, t) => a + t.m * t.k * t.k, 0) + m1 * k1 * k1 + k1 + q2 * q1 + q2 + 2 * q2 * q2 + q2);
    this.inverse = {
      out: terms.map((t) => arena.take(t.m * t.k * t.k)),
      w11: arena.take(m1 * k1 * k1), col: arena.take(k1), w21: arena.take(q2 * q1), colq: arena.take(q2),
      w22: arena.take(q2 * q2), e: arena.take(q2),
    };
    return this.inverse;
  }
}

/**
 * (T A⁻¹ Tᵀ)[i,i] = Σ_a Σ_c T[i,a] A⁻¹[a,c] T[i,c] for level l of a term with k columns, from its
 * inverse diagonal block: the conditional variance factor of one random effect (Bates et al. 2015, §3.5).
 */
export function conditionalVarianceFactor(T: Float64Array, blk: Float64Array, l: number, k: number, i: number): number {
  let v = 0;
  for (let a = 0; a <= i; a++) for (let c = 0; c <= i; c++) v += T[i * k + a] * blk[l * k * k + a * k + c] * T[i * k + c];
  return v;
}
