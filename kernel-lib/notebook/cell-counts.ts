/** Rows per combination of two grouping factors, and a heat map of them: empty cells stand out. */
import { columnLength, type Columns } from '../data/columns';
import { isMissing } from '../data/missing';
import type { TopLevelSpec } from 'vega-lite';
import { nestedLabel } from '../data/describe-survey';

export interface CellCountRow {
  [factor: string]: string | number;
  rows: number;
  /** Rows with a recorded (non-missing) response. */
  recorded: number;
}

/**
 * Every combination of the levels of `a` and `b` seen anywhere in the table (empty ones with
 * 0 rows), rows sorted by a then b (labels in text order).
 */
export function cellCounts(
  data: Columns, a: string, b: string, response: string, within: Readonly<Record<string, string>> = {},
): CellCountRow[] {
  const n = columnLength(data);
  const counts = new Map<string, { rows: number; recorded: number }>();
  const levelsA = new Set<string>();
  const levelsB = new Set<string>();
  for (let i = 0; i < n; i++) {
    const x = nestedLabel(data, a, i, within);
    const y = nestedLabel(data, b, i, within);
    if (x === null || y === null) continue;
    levelsA.add(x);
    levelsB.add(y);
    const key = `${x}\u0000${y}`;
    const c = counts.get(key) ?? { rows: 0, recorded: 0 };
    c.rows++;
    if (!isMissing(data[response][i])) c.recorded++;
    counts.set(key, c);
  }
  const order = (s: Set<string>) => [...s].sort((p, q) => p.localeCompare(q, 'en', { numeric: true }));
  const out: CellCountRow[] = [];
  for (const x of order(levelsA)) {
    for (const y of order(levelsB)) {
      const c = counts.get(`${x}\u0000${y}`) ?? { rows: 0, recorded: 0 };
      out.push({ [a]: x, [b]: y, rows: c.rows, recorded: c.recorded });
    }
  }
  return out;
}

/** Heat map of recorded responses per cell, the count written in each cell; empty cells in red. */
export function cellCountChart(rows: readonly CellCountRow[], a: string, b: string, response: string): TopLevelSpec {
  const esc = (f: string) => f.replace(/[.[\]\\]/g, '\\$&');
  const order = (f: string) => [...new Set(rows.map((r) => String(r[f])))];
  const half = Math.max(0, ...rows.map((r) => r.recorded)) / 2;
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v5.json',
    title: { text: `Recorded ${response} per ${a} and ${b}`, subtitle: 'Number in each cell: rows with a recorded response; red: none.' },
    data: { values: rows.map((r) => ({ ...r })) },
    encoding: {
      x: { field: esc(b), type: 'ordinal', title: b, sort: order(b) },
      y: { field: esc(a), type: 'ordinal', title: a, sort: order(a) },
    },
    layer: [
      {
        mark: { type: 'rect', stroke: 'white' },
        encoding: {
          color: {
            condition: { test: 'datum.recorded === 0', value: '#D55E00' },
            field: 'recorded', type: 'quantitative', title: 'recorded', scale: { scheme: 'blues', zero: true },
          },
        },
      },
      {
        mark: { type: 'text', fontSize: 10 },
        encoding: {
          text: { field: 'recorded', type: 'quantitative' },
          // white on the darker half of the scale, so the count stays readable
          color: { condition: { test: `datum.recorded > ${half}`, value: 'white' }, value: 'black' },
        },
      },
    ],
    config: { font: 'Helvetica Neue, Helvetica, Arial, sans-serif', view: { stroke: null } },
  } as TopLevelSpec;
}
