/**
 * The fixed layout of a survey: every cell (combination of factor levels, nested levels
 * included) and every row of a complete data set, before any observation goes missing.
 */
import type { ResolvedFactor } from './types';

export interface Layout {
  /** Number of cells: the product of the factors' `levels`. */
  cells: number;
  /** Global level of each factor in each cell: cellLevel[f][c]. */
  cellLevel: Int32Array[];
  /** Observations per cell. */
  cellSize: Int32Array;
  /** Rows of a complete data set (sum of cellSize). */
  rows: number;
  /** Global level of each factor in each row: rowLevel[f][r]. Rows run cell by cell. */
  rowLevel: Int32Array[];
}

/**
 * Cells in mixed-radix order over the factors as declared, the last factor changing fastest.
 * A nested factor's own digit i combines with its outer factor's level o as o · levels + i,
 * so its levels are numbered through the survey in outer-level order.
 */
export function buildLayout(
  factors: readonly ResolvedFactor[],
  perCell: number,
  unequal?: { factor: string; sizes: readonly number[] },
): Layout {
  const nf = factors.length;
  let cells = 1;
  for (const f of factors) cells *= f.levels;
  const index = new Map(factors.map((f, i) => [f.name, i]));
  // Resolve outer factors before inner ones when turning digits into global levels.
  const order: number[] = [];
  const placed = new Set<number>();
  const place = (i: number): void => {
    if (placed.has(i)) return;
    const w = factors[i].within;
    if (w !== undefined) place(index.get(w)!);
    placed.add(i);
    order.push(i);
  };
  for (let i = 0; i < nf; i++) place(i);

  const cellLevel = factors.map(() => new Int32Array(cells));
  const digit = new Int32Array(nf);
  for (let c = 0; c < cells; c++) {
    let rest = c;
    for (let f = nf - 1; f >= 0; f--) {
      digit[f] = rest % factors[f].levels;
      rest = Math.floor(rest / factors[f].levels);
    }
    for (const f of order) {
      const w = factors[f].within;
      cellLevel[f][c] = w === undefined ? digit[f] : cellLevel[index.get(w)!][c] * factors[f].levels + digit[f];
    }
  }

  const cellSize = new Int32Array(cells).fill(perCell);
  if (unequal !== undefined) {
    const levelOf = cellLevel[index.get(unequal.factor)!];
    for (let c = 0; c < cells; c++) cellSize[c] = unequal.sizes[levelOf[c]];
  }
  let rows = 0;
  for (let c = 0; c < cells; c++) rows += cellSize[c];
  const rowLevel = factors.map(() => new Int32Array(rows));
  let r = 0;
  for (let c = 0; c < cells; c++) {
    for (let k = 0; k < cellSize[c]; k++, r++) {
      for (let f = 0; f < nf; f++) rowLevel[f][r] = cellLevel[f][c];
    }
  }
  return { cells, cellLevel, cellSize, rows, rowLevel };
}
