import type { MetricRow } from '../study/metrics';
import { summaryRows } from '../study/summary-rows';
import { renderTable } from '../display/text-table';

/** Metrics shown by default, in this order, when present. */
const DEFAULT_METRICS = ['coverage', 'noIntervalShare', 'bias', 'rmse', 'width', 'power', 'typeIError', 'sdMean', 'sdMedian', 'singularShare', 'failureShare', 'notEstimableShare'];

/** One line per scenario × variant × parameter: its true value, then a column per metric, each "value (MCSE)". */
export function formatMetricsTable(metrics: readonly MetricRow[], wanted: string[] = DEFAULT_METRICS): string {
  const { metrics: present, rows } = summaryRows(metrics, wanted);
  const body = rows.map((r) => [r.scenario, r.variant, r.parameter, r.truth, ...present.map((m) => r.cells[m])]);
  return renderTable(['scenario', 'variant', 'parameter', 'truth', ...present], body);
}
