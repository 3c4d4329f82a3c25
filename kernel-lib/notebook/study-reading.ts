/**
 * Reading a coverage study for a decision: which analysis variants kept their intervals' coverage
 * in every scenario, and which interval method did best. Shortfall rule as in readCoverage:
 * coverage below level − 2·sqrt(level·(1 − level)/n), the Monte Carlo SE of a proportion at the
 * nominal level (Morris, White and Crowther 2019, Statistics in Medicine 38:2074, Table 6).
 */
import type { MetricRow } from '../study/metrics';
import type { StudyManifest } from '../study/study-folder';
import { coverageShortfallLimit as shortfallLimit, scenarioLabels } from '../study/reading';
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
  /** Scenario × parameter cells whose coverage is within 2 MCSE of the level or above it, "k of m". */
  'coverage kept': string;
  'lowest coverage': number;
  /** Parameter and scenario of the lowest coverage (the last one listed when tied, as readCoverage reports it). */
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
  options: { parameters?: readonly string[]; level?: number } = {},
): CoverageVerdictRow[] {
  const level = options.level ?? 0.95;
  const labels = scenarioLabels(scenarios);
  const rows = coverageRows(metrics, options.parameters);
  const variants = [...new Set(rows.map((m) => m.variant))];
  return variants.map((variant) => {
    const mine = rows.filter((m) => m.variant === variant && Number.isFinite(m.value) && m.n > 0);
    const kept = mine.filter((m) => m.value >= shortfallLimit(level, m.n));
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
  options: { parameters?: readonly string[]; level?: number } = {},
): IntervalChoice {
  const level = options.level ?? 0.95;
  const methodOf = new Map(variants.map((v) => [v.name, parseModel(v.model).interval]));
  const rows = coverageRows(metrics, options.parameters).filter((m) => Number.isFinite(m.value) && m.n > 0);
  const methods = [...new Set(variants.map((v) => methodOf.get(v.name)!))];
  const scored = methods
    .map((method) => {
      const mine = rows.filter((m) => methodOf.get(m.variant) === method);
      const short = mine.filter((m) => m.value < shortfallLimit(level, m.n)).length;
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
      `${best.method} intervals fell short of ${pct(level)} coverage in ${best.short} of ${best.cells} scenario × parameter cells ` +
      `(lowest ${pct(best.lowest)})` + (others.length ? `; ${others.join('; ')}` : '') + '.',
  };
}
