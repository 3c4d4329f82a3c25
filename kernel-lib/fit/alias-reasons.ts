/**
 * Why a fixed-effect column cannot be estimated, in words: an empty cell of an interaction (the
 * column is zero in every row used), or the estimable columns it is a linear combination of.
 * Which columns belong to which factor comes from the column roles (data/design-matrices), never
 * from the coefficient names, which serve only as labels in the message.
 */
import { choleskyInPlace, forwardSolveInPlace, backSolveTransposeInPlace } from '../numeric/dense';
import { listNames } from '../model/errors';
import type { DesignMatrices } from '../data/design-matrices';

type AliasDesign = Pick<DesignMatrices, 'n' | 'p' | 'X' | 'fixedNames' | 'roles'>;

/** Coefficients below this (on the unit-norm column scale) do not count as part of the combination. */
const PART_TOLERANCE = 1e-6;

/**
 * One reason per aliased column. `xtx` holds XᵀX in its leading p×p block (row stride `stride`),
 * `estimable`/`aliased` are column indices as from aliasingFromCrossProducts.
 */
export function aliasReasons(
  design: AliasDesign, xtx: Float64Array, stride: number,
  estimable: readonly number[], aliased: readonly number[],
): Record<string, string> {
  const names = design.fixedNames;
  const out: Record<string, string> = {};
  if (aliased.length === 0) return out;
  const m = estimable.length;
  const scale = (j: number) => (xtx[j * stride + j] > 0 ? 1 / Math.sqrt(xtx[j * stride + j]) : 0);
  // Cholesky of the scaled XᵀX over the estimable columns, once for all aliased columns
  const l = new Float64Array(m * m);
  for (let a = 0; a < m; a++) {
    for (let b = 0; b < m; b++) l[a * m + b] = xtx[estimable[a] * stride + estimable[b]] * scale(estimable[a]) * scale(estimable[b]);
  }
  const factored = m > 0 && choleskyInPlace(l, m) === -1;
  for (const j of aliased) {
    const name = names[j];
    const cell = emptyCell(design, j);
    if (cell) {
      out[name] = cell;
      continue;
    }
    if (xtx[j * stride + j] === 0) {
      out[name] = 'the column is zero in every row used';
      continue;
    }
    if (!factored) {
      out[name] = 'a linear combination of other columns';
      continue;
    }
    const c = new Float64Array(m);
    for (let a = 0; a < m; a++) c[a] = xtx[estimable[a] * stride + j] * scale(estimable[a]) * scale(j);
    forwardSolveInPlace(l, m, c);
    backSolveTransposeInPlace(l, m, c);
    const parts = estimable.filter((_, a) => Math.abs(c[a]) > PART_TOLERANCE).map((e) => names[e]);
    out[name] = parts.length ? `equals a combination of ${listNames(parts, 8)} in the rows used` : 'a linear combination of other columns';
  }
  return out;
}

/**
 * For column j, an interaction of two factors whose main effects (level columns) are in X: the
 * first combination of their levels that no row has, in words ('' when every cell is observed or
 * the column is of another kind, e.g. a covariate times a factor).
 */
function emptyCell(design: AliasDesign, j: number): string {
  const { n, p, X, fixedNames, roles } = design;
  const role = roles[j];
  if (role.kind !== 'interaction' || role.sources.length !== 2) return '';
  const factors = role.sources;
  const mains = factors.map((factor) => {
    const cols: { j: number }[] = [];
    roles.forEach((r, c) => { if (r.kind === 'factor-level' && r.sources.length === 1 && r.sources[0] === factor) cols.push({ j: c }); });
    return cols;
  });
  if (mains.some((m) => m.length === 0)) return '';
  const levelOf = (i: number, cols: typeof mains[0]) => {
    for (let k = 0; k < cols.length; k++) if (X[i * p + cols[k].j] !== 0) return k + 1;
    return 0;
  };
  const width = mains[1].length + 1;
  const seen = new Uint8Array((mains[0].length + 1) * width);
  for (let i = 0; i < n; i++) seen[levelOf(i, mains[0]) * width + levelOf(i, mains[1])] = 1;
  const empty = seen.indexOf(0);
  if (empty < 0) return '';
  const label = (cols: typeof mains[0], k: number, factor: string) => (k === 0 ? `the reference level of ${factor}` : fixedNames[cols[k - 1].j]);
  const a = label(mains[0], Math.floor(empty / width), factors[0]);
  const b = label(mains[1], empty % width, factors[1]);
  return `no row used has ${a} together with ${b} (an empty cell of the interaction ${factors[0]}:${factors[1]}); ` +
    `the intercept and the coefficients of ${factors[0]} and ${factors[1]} then describe the observed cells only (compare with a model without the interaction)`;
}
