/**
 * The study summary as rows of text: one row per scenario × variant × parameter with its true
 * value and a cell per metric, "value (MCSE)" to the digits the Monte Carlo error supports.
 * Shared by the printed table and the HTML report, so both show the same numbers.
 */
import { formatMetric } from './format-metric';
import type { MetricRow } from './metrics';

export interface SummaryRow {
  scenario: string;
  variant: string;
  parameter: string;
  /** The true value the estimates are scored against; '' for the fit shares (parameter '*'). */
  truth: string;
  /** Metric name → "value (MCSE)", or 'not estimable', or '' when the metric does not apply. */
  cells: Record<string, string>;
}

/**
 * The true value of each scenario × variant × parameter, read back from its metrics:
 * mean estimate − bias (bias is the mean of estimate − truth). When the target varies by
 * replicate (realised effects) this is the mean target, marked "(mean)".
 */
function truthOf(rows: ReadonlyMap<string, MetricRow>): string {
  const bias = rows.get('bias');
  const mean = rows.get('mean') ?? rows.get('sdMean');
  if (!bias || !mean || !Number.isFinite(bias.value) || !Number.isFinite(mean.value)) return '';
  // 6 significant digits remove the rounding noise of the subtraction; a mean target gets 4
  const varies = bias.note?.includes('target varies') === true;
  const truth = Number((mean.value - bias.value).toPrecision(varies ? 4 : 6));
  return `${Object.is(truth, -0) ? 0 : truth}${varies ? ' (mean)' : ''}`;
}

/** Summary rows in the order the metrics first name them; `wanted` metrics absent from every row are dropped. */
export function summaryRows(metrics: readonly MetricRow[], wanted: readonly string[]): { metrics: string[]; rows: SummaryRow[] } {
  const present = wanted.filter((m) => metrics.some((r) => r.metric === m));
  const groups = new Map<string, Map<string, MetricRow>>();
  for (const m of metrics) {
    const key = `${m.scenario}\u0000${m.variant}\u0000${m.parameter}`;
    if (!groups.has(key)) groups.set(key, new Map());
    groups.get(key)!.set(m.metric, m);
  }
  const rows: SummaryRow[] = [];
  for (const [key, byMetric] of groups) {
    if (!present.some((m) => byMetric.has(m)) && byMetric.get('notEstimableShare')?.value !== 1) continue;
    const [scenario, variant, parameter] = key.split('\u0000');
    // A coefficient aliased in every replicate has no other metric: say so in its cells.
    const never = byMetric.get('notEstimableShare')?.value === 1;
    const cells: Record<string, string> = {};
    for (const m of present) {
      const r = byMetric.get(m);
      cells[m] = r ? formatMetric(r.value, r.mcse) : never ? 'not estimable' : '';
    }
    rows.push({ scenario, variant, parameter, truth: parameter === '*' ? '' : truthOf(byMetric), cells });
  }
  return { metrics: present, rows };
}
