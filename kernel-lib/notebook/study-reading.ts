/**
 * Interval-method helpers for a coverage study: which variants kept their intervals' coverage in
 * every scenario, and which interval method did best. A cell falls short when the study reading's
 * rule (study/reading, judgeCoverage) says it undercovers.
 */
import type { MetricRow } from '../study/metrics';
import type { StudyManifest } from '../study/study-folder';
import { judgeCoverage, scenarioLabels } from '../study/reading';
import { parseModel } from '../model/parse';
import type { ModelSpec } from '../model/types';
import type { SurveyDesignSpec, VariantSpec } from '../design/types';

/** Small-sample interval methods in order of preference; the first the engine offers is used. */
export const SMALL_SAMPLE_PREFERENCE = ['satterthwaite'] as const;

/** The preferred small-sample interval method among `available` (e.g. INTERVAL_METHODS), else 'wald'. */
export function smallSampleMethod(available: readonly string[]): string {
  return SMALL_SAMPLE_PREFERENCE.find((m) => available.includes(m)) ?? 'wald';
}

/**
 * The design with every variant's interval method written out (`wald` where none is given, so a
 * change of the model default does not change the study) and, when `method` is not 'wald', a copy
 * of each variant using `method`, named "<variant>, <method>".
 */
export function withIntervalVariants(design: SurveyDesignSpec, method: string): SurveyDesignSpec {
  const base: VariantSpec[] = design.variants.map((v) => ({ ...v, model: { ...v.model, interval: v.model.interval ?? 'wald' } }));
  const extra: VariantSpec[] =
    method === 'wald' ? [] : base.map((v) => ({ name: `${v.name}, ${method}`, model: { ...v.model, interval: method } }));
  return { ...design, variants: [...base, ...extra] };
}

export interface CoverageVerdictRow {
  variant: string;
  /** Scenario × parameter cells where coverage is not shown to fall short (judgeCoverage), "k of m". */
  'coverage kept': string;
  'lowest coverage': number;
  /** Parameter and scenario of the lowest coverage (the last one listed when tied). */
  where: string;
  /** 'kept everywhere', 'falls short' or 'no intervals'. */
  verdict: string;
}

function coverageRows(metrics: readonly MetricRow[], parameters?: readonly string[]): MetricRow[] {
  return metrics.filter((m) => m.metric === 'coverage' && m.kind === 'fixed' && (!parameters || parameters.includes(m.parameter)));
}

/** Per variant: in how many scenario × parameter cells coverage was kept, and the lowest coverage with where it occurred. */
export function coverageVerdicts(
  metrics: readonly MetricRow[],
  scenarios: StudyManifest['scenarios'],
  options: { parameters?: readonly string[]; tolerance?: number } = {},
): CoverageVerdictRow[] {
  const labels = scenarioLabels(scenarios);
  const rows = coverageRows(metrics, options.parameters);
  const variants = [...new Set(rows.map((m) => m.variant))];
  return variants.map((variant) => {
    const mine = rows.filter((m) => m.variant === variant && Number.isFinite(m.value) && m.n > 0);
    const kept = mine.filter((m) => judgeCoverage(m, options).class !== 'undercovers');
    const lowest = mine.reduce<MetricRow | null>((a, b) => (a === null || b.value <= a.value ? b : a), null);
    return {
      variant,
      'coverage kept': `${kept.length} of ${mine.length}`,
      'lowest coverage': lowest ? lowest.value : NaN,
      where: lowest ? `${lowest.parameter} at ${labels.get(lowest.scenario) ?? lowest.scenario}` : '',
      verdict: mine.length === 0 ? 'no intervals' : kept.length === mine.length ? 'kept everywhere' : 'falls short',
    };
  });
}

export interface IntervalChoice {
  method: string;
  /** One plain sentence saying why. */
  reason: string;
}

/**
 * The interval method whose variants fell short of the nominal coverage in the fewest
 * scenario × parameter cells (ties: the higher lowest coverage, then the order of the variants).
 * `variants` are the study's variants, whose models name their methods (defaults resolved by parseModel).
 */
export function favouredInterval(
  metrics: readonly MetricRow[],
  variants: readonly { name: string; model: ModelSpec }[],
  options: { parameters?: readonly string[]; tolerance?: number } = {},
): IntervalChoice {
  const methodOf = new Map(variants.map((v) => [v.name, parseModel(v.model).interval]));
  const rows = coverageRows(metrics, options.parameters).filter((m) => Number.isFinite(m.value) && m.n > 0);
  const methods = [...new Set(variants.map((v) => methodOf.get(v.name)!))];
  const scored = methods
    .map((method) => {
      const mine = rows.filter((m) => methodOf.get(m.variant) === method);
      const short = mine.filter((m) => judgeCoverage(m, options).class === 'undercovers').length;
      const lowest = mine.reduce((a, m) => Math.min(a, m.value), Infinity);
      return { method, short, lowest, cells: mine.length };
    })
    .filter((s) => s.cells > 0);
  if (scored.length === 0) return { method: 'wald', reason: 'the study holds no coverage results for these parameters; Wald intervals by default' };
  const best = scored.reduce((a, b) => (b.short < a.short || (b.short === a.short && b.lowest > a.lowest) ? b : a));
  const pct = (v: number) => `${(100 * v).toFixed(1)}%`;
  const others = scored.filter((s) => s !== best).map((s) => `${s.method}: ${s.short} of ${s.cells}, lowest ${pct(s.lowest)}`);
  return {
    method: best.method,
    reason:
      `${best.method} intervals fell short of nominal coverage in ${best.short} of ${best.cells} scenario × parameter cells ` +
      `(lowest ${pct(best.lowest)})` + (others.length ? `; ${others.join('; ')}` : '') + '.',
  };
}
