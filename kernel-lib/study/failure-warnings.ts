/**
 * Failed fits said out loud: one sentence per scenario × variant whose fits failed in some
 * replicates, with the share and the most common reasons (from the failureShare metric rows).
 * The run prints them, the summary table and the report show them before any metric.
 */
import type { MetricRow } from './metrics';

/** `labels` gives readable scenario names (e.g. "year levels = 3"); default: the scenario keys. */
export function failureWarnings(metrics: readonly MetricRow[], labels?: ReadonlyMap<string, string>): string[] {
  const out: string[] = [];
  for (const m of metrics) {
    if (m.metric !== 'failureShare' || !(m.value > 0)) continue;
    const failed = Math.round(m.value * m.n);
    const reasons = m.note?.split('; ').filter((s) => !s.startsWith('proportion is')).join('; ');
    out.push(
      `variant "${m.variant}" (scenario ${labels?.get(m.scenario) ?? m.scenario}): ${failed} of ${m.n} fits failed ` +
        `(${(100 * m.value).toFixed(1)}%)` +
        `${reasons ? `; ${reasons}` : ''}. Metrics use the other replicates, so they describe only the data sets that could be fitted.`,
    );
  }
  return out;
}
