import type { MetricRow } from './metrics';
import type { StudyManifest } from './study-folder';
import { scenarioFieldName } from './scenario-fields';

const pct = (v: number) => `${(100 * v).toFixed(1)}%`;

/**
 * Coverage below this counts as falling short: the nominal level minus 2 Monte Carlo SEs of a
 * proportion at that level over n replicates (Morris, White and Crowther 2019, Table 6).
 */
export function coverageShortfallLimit(level: number, n: number): number {
  return level - 2 * Math.sqrt((level * (1 - level)) / n);
}

/** "year levels = 3, sd site = 0.5" for each scenario key ("the design" without a grid). */
export function scenarioLabels(scenarios: StudyManifest['scenarios']): Map<string, string> {
  return new Map(
    scenarios.map((s) => [s.key, Object.entries(s.values).map(([p, v]) => `${scenarioFieldName(p)} = ${v}`).join(', ') || 'the design']),
  );
}

/**
 * Plain-language reading of the coverage results: per parameter, which variants keep their
 * intervals' coverage within 2 Monte Carlo SEs of the nominal level in which scenarios. A reading,
 * not a recommendation: it holds only for the simulated assumptions.
 */
export function readCoverage(metrics: readonly MetricRow[], scenarios: StudyManifest['scenarios'], level = 0.95): string[] {
  const label = scenarioLabels(scenarios);
  const cov = metrics.filter((m) => m.metric === 'coverage' && m.kind === 'fixed');
  const params = [...new Set(cov.map((m) => m.parameter))];
  const lines: string[] = [];
  for (const parameter of params) {
    const rows = cov.filter((m) => m.parameter === parameter);
    const variants = [...new Set(rows.map((m) => m.variant))];
    const parts: string[] = [];
    for (const variant of variants) {
      const mine = rows.filter((m) => m.variant === variant);
      const low = mine.filter((m) => m.value < coverageShortfallLimit(level, m.n));
      if (!low.length) {
        parts.push(`with **${variant}**, coverage stayed near ${pct(level)} in every scenario (${mine.map((m) => pct(m.value)).join(', ')})`);
      } else {
        const worst = low.reduce((a, b) => (a.value < b.value ? a : b));
        parts.push(`with **${variant}**, coverage fell short of ${pct(level)} in ${low.length} of ${mine.length} scenarios, worst ${pct(worst.value)} (MCSE ${pct(worst.mcse)}) at ${label.get(worst.scenario)}`);
      }
    }
    lines.push(`\`${parameter}\`: ${parts.join('; ')}.`);
  }
  return lines;
}
