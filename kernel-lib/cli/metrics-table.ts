import type { MetricRow } from '../study/metrics';
import { formatMetric } from '../study/format-metric';
import { renderTable, type Cell } from '../display/text-table';

/** Metrics shown by default, in this order, when present. */
const DEFAULT_METRICS = ['coverage', 'noIntervalShare', 'bias', 'rmse', 'width', 'power', 'typeIError', 'sdMean', 'sdMedian', 'singularShare', 'failureShare', 'notEstimableShare'];

/** One line per scenario × variant × parameter, a column per metric, each "value (MCSE)". */
export function formatMetricsTable(metrics: readonly MetricRow[], wanted: string[] = DEFAULT_METRICS): string {
  const present = wanted.filter((m) => metrics.some((r) => r.metric === m));
  const rows = new Map<string, Map<string, MetricRow>>();
  for (const m of metrics) {
    if (!present.includes(m.metric)) continue;
    const key = `${m.scenario}\u0000${m.variant}\u0000${m.parameter}`;
    if (!rows.has(key)) rows.set(key, new Map());
    rows.get(key)!.set(m.metric, m);
  }
  const body: Cell[][] = [];
  for (const [key, byMetric] of rows) {
    const [scenario, variant, parameter] = key.split('\u0000');
    // A coefficient aliased in every replicate has no other metric: say so in its cells.
    const never = byMetric.get('notEstimableShare')?.value === 1;
    body.push([scenario, variant, parameter, ...present.map((m) => {
      const r = byMetric.get(m);
      if (r) return formatMetric(r.value, r.mcse);
      return never ? 'not estimable' : '';
    })]);
  }
  return renderTable(['scenario', 'variant', 'parameter', ...present], body);
}
