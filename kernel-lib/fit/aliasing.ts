import type { ColumnRole, DesignMatrices } from '../data/design-matrices';

/** Which fixed-effect columns can be estimated and which are linear combinations of earlier ones. */
export interface AliasReport {
  /** Indices (into the design's columns) of estimable columns, in order. */
  estimable: number[];
  /** Indices of aliased columns. */
  aliased: number[];
}

/** Relative pivot below which a column counts as a combination of the earlier ones. */
const ALIAS_TOLERANCE = 1e-9;

/**
 * Detect aliased columns of X by a sequential Cholesky factorisation of the scaled cross-product
 * matrix, skipping a column whose remaining pivot falls below ALIAS_TOLERANCE of its own norm
 * (Golub and Van Loan, Matrix Computations, 4th ed. 2013, §5.4.1 on rank-revealing factorisations).
 * Columns are visited in `priority` order and earlier ones win. The caller puts the intercept and
 * the dummies of fixed grouping factors first, so that with site fixed a site-level covariate is
 * the coefficient marked not estimable (the site dummies absorb it), as an analyst expects.
 * `xtx` is a symmetric cross-product matrix whose leading p×p block is XᵀX (row stride `stride`),
 * e.g. the engine's [X y]ᵀ[X y], so X is not read again.
 */
export function aliasingFromCrossProducts(xtx: Float64Array, p: number, stride: number, priority?: number[]): AliasReport {
  const scale = new Float64Array(p);
  for (let a = 0; a < p; a++) scale[a] = xtx[a * stride + a] > 0 ? 1 / Math.sqrt(xtx[a * stride + a]) : 0;
  const l = new Float64Array(p * p);
  const estimable: number[] = [];
  const aliased: number[] = [];
  const visit = priority ?? Array.from({ length: p }, (_, j) => j);
  const row = new Float64Array(p);
  for (const j of visit) {
    if (scale[j] === 0) { aliased.push(j); continue; }
    // row j of the factor against the estimable columns found so far
    let d = 1;
    for (let e = 0; e < estimable.length; e++) {
      const c = estimable[e];
      let s = xtx[j * stride + c] * scale[j] * scale[c];
      for (let k = 0; k < e; k++) s -= row[k] * l[e * p + k];
      row[e] = s / l[e * p + e];
      d -= row[e] * row[e];
    }
    if (d > ALIAS_TOLERANCE) {
      const e = estimable.length;
      for (let k = 0; k < e; k++) l[e * p + k] = row[k];
      l[e * p + e] = Math.sqrt(d);
      estimable.push(j);
    } else {
      aliased.push(j);
    }
  }
  estimable.sort((a, b) => a - b);
  aliased.sort((a, b) => a - b);
  return { estimable, aliased };
}

/**
 * Order in which X columns claim estimability, from their roles: the intercept, then the columns
 * of grouping factors entered as fixed, then everything else (each group in column order). So with
 * site fixed, a site-level covariate is the column reported as not estimable, and the site effects stay.
 */
export function estimabilityOrder(roles: readonly ColumnRole[]): number[] {
  const first: number[] = [];
  const group: number[] = [];
  const rest: number[] = [];
  roles.forEach((role, j) => {
    if (role.kind === 'intercept') first.push(j);
    else if (role.fixedGroup !== undefined) group.push(j);
    else rest.push(j);
  });
  return [...first, ...group, ...rest];
}

/** A copy of the design keeping only the given fixed-effect columns. */
export function restrictColumns(design: DesignMatrices, keep: number[]): DesignMatrices {
  if (keep.length === design.p) return design;
  const { n, p, X } = design;
  const q = keep.length;
  const out = new Float64Array(n * q);
  for (let i = 0; i < n; i++) for (let j = 0; j < q; j++) out[i * q + j] = X[i * p + keep[j]];
  return { ...design, p: q, X: out, fixedNames: keep.map((j) => design.fixedNames[j]), roles: keep.map((j) => design.roles[j]) };
}
