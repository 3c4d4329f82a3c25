/**
 * Why a fixed-effect column cannot be estimated, in words: an empty cell of an interaction (the
 * column is zero in every row used), or the estimable columns it is a linear combination of.
 */
import { choleskyInPlace, forwardSolveInPlace, backSolveTransposeInPlace } from '../numeric/dense';
import { listNames } from '../model/errors';
import type { DesignMatrices } from '../data/design-matrices';

/** Coefficients below this (on the unit-norm column scale) do not count as part of the combination. */
const PART_TOLERANCE = 1e-6;

/**
 * One reason per aliased column. `xtx` holds XᵀX in its leading p×p block (row stride `stride`),
 * `estimable`/`aliased` are column indices as from aliasingFromCrossProducts.
 */
export function aliasReasons(
  design: Pick<DesignMatrices, 'n' | 'p' | 'X' | 'fixedNames'>, xtx: Float64Array, stride: number,
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
    const cell = emptyCell(design, name);
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

/** Factor name of a level column, "habitat[wet]" or "habitat=wet" -> "habitat" (null for other columns). */
function factorOf(column: string): { factor: string; level: string } | null {
  const m = /^([^:[=]+)(?:\[(.*)\]|=(.*))$/.exec(column);
  return m ? { factor: m[1], level: m[2] ?? m[3] } : null;
}

/**
 * For an interaction of two categorical terms whose main effects are in X: the first combination
 * of their levels that no row has, in words ('' when every cell is observed or the column is of
 * another kind).
 */
function emptyCell(design: Pick<DesignMatrices, 'n' | 'p' | 'X' | 'fixedNames'>, name: string): string {
  const parts = name.split(':').map(factorOf);
  if (parts.length !== 2 || !parts[0] || !parts[1]) return '';
  const { n, p, X, fixedNames } = design;
  const mains = parts.map((part) => fixedNames.map((c, j) => ({ j, f: factorOf(c) })).filter((x) => x.f && x.f.factor === part!.factor && !fixedNames[x.j].includes(':')));
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
  const a = label(mains[0], Math.floor(empty / width), parts[0].factor);
  const b = label(mains[1], empty % width, parts[1].factor);
  return `no row used has ${a} together with ${b} (an empty cell of the interaction ${parts[0].factor}:${parts[1].factor}); ` +
    `the intercept and the coefficients of ${parts[0].factor} and ${parts[1].factor} then describe the observed cells only (compare with a model without the interaction)`;
}
