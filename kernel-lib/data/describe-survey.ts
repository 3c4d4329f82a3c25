import { QuadratInputError, listNames } from '../model/errors';
import { columnLength, type Columns } from './columns';
import { isMissing } from './missing';

/** One grouping factor as seen in the data. */
export interface FactorSummary {
  factor: string;
  levels: number;
  /** Observations per level: smallest, median, largest. */
  perLevelMin: number;
  perLevelMedian: number;
  perLevelMax: number;
  /** Rows where this factor is missing. */
  missing: number;
}

/** How two grouping factors relate in the data. */
export interface FactorPairSummary {
  a: string;
  b: string;
  /**
   * `nested`: every level of a occurs with one level of b only (a within b); `contains`: the reverse;
   * `crossed`: every combination occurs; `partly crossed`: some combinations are missing.
   */
  relation: 'nested' | 'contains' | 'crossed' | 'partly crossed';
  /** Combinations of levels present / possible. */
  cellsPresent: number;
  cellsPossible: number;
}

export interface SurveySummary {
  rows: number;
  factors: FactorSummary[];
  pairs: FactorPairSummary[];
  /** Rows per combination of all factors: smallest and largest over the combinations present. */
  perCellMin: number;
  perCellMax: number;
  /** Every combination present holds the same number of rows, and no crossed cell is empty. */
  balanced: boolean;
  /** Missing values of the response (when given). */
  responseMissing: number;
}

/** Label of `factor` in row i with its outer factors' labels in front ("ashpool/2"); null when any is missing. */
export function nestedLabel(data: Columns, factor: string, i: number, within: Readonly<Record<string, string>>, depth = 0): string | null {
  const v = data[factor][i];
  if (isMissing(v)) return null;
  const outer = within[factor];
  // depth guard: a cycle in `within` would otherwise recurse forever
  if (!outer || !(outer in data) || depth > 8) return String(v);
  const o = nestedLabel(data, outer, i, within, depth + 1);
  return o === null ? null : `${o}/${String(v)}`;
}

function median(values: number[]): number {
  const s = [...values].sort((x, y) => x - y);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/**
 * Describe the grouping structure of a survey table: levels per factor, replicates per level,
 * which factors are crossed or nested, balance and empty cells. Labels are compared as text;
 * a factor declared in `within` (e.g. { plot: 'site' }) is identified by the pair (outer, own label),
 * so plot "1" of two sites counts as two plots.
 */
export function describeSurvey(data: Columns, factors: string[], response?: string, within: Record<string, string> = {}): SurveySummary {
  const n = columnLength(data);
  const names = Object.keys(data);
  for (const f of [...factors, ...(response ? [response] : [])]) {
    if (!(f in data)) throw new QuadratInputError(`column "${f}" not found; columns: ${listNames(names)}`, { column: f });
  }
  if (!factors.length) throw new QuadratInputError('describeSurvey: name at least one grouping factor', { field: 'factors' });
  const labels = factors.map((f) => {
    const out: (string | null)[] = new Array(n);
    for (let i = 0; i < n; i++) out[i] = nestedLabel(data, f, i, within);
    return out;
  });
  const summaries: FactorSummary[] = factors.map((factor, j) => {
    const counts = new Map<string, number>();
    let missing = 0;
    for (const v of labels[j]) {
      if (v === null) missing++;
      else counts.set(v, (counts.get(v) ?? 0) + 1);
    }
    const c = [...counts.values()];
    return {
      factor, levels: counts.size, missing,
      perLevelMin: c.length ? Math.min(...c) : 0, perLevelMedian: c.length ? median(c) : 0, perLevelMax: c.length ? Math.max(...c) : 0,
    };
  });
  const pairs: FactorPairSummary[] = [];
  for (let a = 0; a < factors.length; a++) {
    for (let b = a + 1; b < factors.length; b++) {
      const partnersOfA = new Map<string, Set<string>>();
      const partnersOfB = new Map<string, Set<string>>();
      const cells = new Set<string>();
      for (let i = 0; i < n; i++) {
        const x = labels[a][i];
        const y = labels[b][i];
        if (x === null || y === null) continue;
        if (!partnersOfA.has(x)) partnersOfA.set(x, new Set());
        if (!partnersOfB.has(y)) partnersOfB.set(y, new Set());
        partnersOfA.get(x)!.add(y);
        partnersOfB.get(y)!.add(x);
        cells.add(`${x}\u0000${y}`);
      }
      const possible = partnersOfA.size * partnersOfB.size;
      const aWithinB = [...partnersOfA.values()].every((s) => s.size === 1) && partnersOfB.size > 1;
      const bWithinA = [...partnersOfB.values()].every((s) => s.size === 1) && partnersOfA.size > 1;
      const relation = aWithinB ? 'nested' : bWithinA ? 'contains' : cells.size === possible ? 'crossed' : 'partly crossed';
      pairs.push({ a: factors[a], b: factors[b], relation, cellsPresent: cells.size, cellsPossible: possible });
    }
  }
  const cellCounts = new Map<string, number>();
  for (let i = 0; i < n; i++) {
    if (labels.some((l) => l[i] === null)) continue;
    const key = labels.map((l) => l[i]).join('\u0000');
    cellCounts.set(key, (cellCounts.get(key) ?? 0) + 1);
  }
  const cc = [...cellCounts.values()];
  let responseMissing = 0;
  if (response) for (let i = 0; i < n; i++) if (isMissing(data[response][i])) responseMissing++;
  const perCellMin = cc.length ? Math.min(...cc) : 0;
  const perCellMax = cc.length ? Math.max(...cc) : 0;
  return {
    rows: n, factors: summaries, pairs, perCellMin, perCellMax,
    balanced: perCellMin === perCellMax && pairs.every((p) => p.relation !== 'partly crossed'),
    responseMissing,
  };
}
