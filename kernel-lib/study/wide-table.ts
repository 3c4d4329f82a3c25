/** One row per scenario x variant x parameter, with a column per metric and one per MCSE. */
import type { MetricRow } from './metrics';

export interface WideRow {
  scenario: string;
  variant: string;
  parameter: string;
  kind: string;
  /** `<metric>` holds the value, `<metric>Mcse` its MCSE and `<metric>N` the replicates used. */
  [column: string]: string | number;
}

/** Pivots metric rows to wide form, keeping first-seen row order; absent metrics are absent columns. */
export function toWideTable(metrics: readonly MetricRow[]): WideRow[] {
  const rows = new Map<string, WideRow>();
  for (const m of metrics) {
    const key = `${m.scenario}\u0000${m.variant}\u0000${m.parameter}`;
    let row = rows.get(key);
    if (row === undefined) {
      row = { scenario: m.scenario, variant: m.variant, parameter: m.parameter, kind: m.kind };
      rows.set(key, row);
    }
    if (m.metric in row) {
      throw new Error(
        `toWideTable: metric '${m.metric}' appears twice for scenario '${m.scenario}', ` +
          `variant '${m.variant}', parameter '${m.parameter}'`,
      );
    }
    row[m.metric] = m.value;
    row[`${m.metric}Mcse`] = m.mcse;
    row[`${m.metric}N`] = m.n;
  }
  return [...rows.values()];
}
