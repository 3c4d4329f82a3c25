/** A compact table of a study's metrics: one row per scenario and variant, a "value (MCSE)" column per metric. */
import type { MetricName, MetricRow } from '../study/metrics';
import type { StudyManifest } from '../study/study-folder';
import { formatMetric } from '../study/format-metric';
import { scenarioFieldName } from '../study/scenario-fields';

export function metricTable(
  metrics: readonly MetricRow[],
  scenarios: StudyManifest['scenarios'],
  parameter: string,
  names: readonly MetricName[] = ['coverage', 'bias', 'rmse', 'power'],
): Record<string, string | number>[] {
  const byKey = new Map(scenarios.map((s) => [s.key, s.values]));
  const rows = new Map<string, Record<string, string | number>>();
  for (const m of metrics) {
    if (m.parameter !== parameter || !names.includes(m.metric)) continue;
    const key = `${m.scenario}\u0000${m.variant}`;
    let row = rows.get(key);
    if (!row) {
      row = {};
      for (const [path, v] of Object.entries(byKey.get(m.scenario) ?? {})) row[scenarioFieldName(path)] = v;
      row.variant = m.variant;
      for (const name of names) row[name] = '';
      rows.set(key, row);
    }
    row[m.metric] = formatMetric(m.value, m.mcse);
  }
  return [...rows.values()];
}
