/**
 * Library results as arquero tables, for wrangling with arquero's verbs (filter, derive, join,
 * groupby/rollup) in notebooks and scripts. Each table has one row per record and plain columns.
 */
import * as aq from 'arquero';
import type { ColumnTable } from 'arquero';
import { toColumns, type Columns } from '../data/columns';
import { nestedLabel } from '../data/describe-survey';
import type { ModelSpec } from '../model/types';
import type { GroupEffectRow } from '../plots/predicted-group-effects';
import type { SurveyData } from '../analyse/fit-model';
import type { FitResult } from '../fit/result';
import { normalQuantile } from '../numeric/distributions';
import type { MetricRow } from '../study/metrics';
import type { ReplicateRow } from '../study/replicate-row';

/** A survey (columns, records or an arquero table) as an arquero table. */
export function surveyTable(data: SurveyData): ColumnTable {
  const columns = toColumns(data as Columns);
  return aq.table(Object.fromEntries(Object.entries(columns).map(([k, v]) => [k, Array.from(v as ArrayLike<unknown>)])));
}

const num = (v: number) => (Number.isFinite(v) ? v : NaN);

/** Fixed effects of a fit: effect, estimate, se, lower, upper, df, method, estimable. */
export function fixedEffectsTable(fit: FitResult): ColumnTable {
  return aq.from(fit.fixed.map((r) => ({
    effect: r.term, estimate: num(r.estimate), se: num(r.se), lower: num(r.lower), upper: num(r.upper), df: r.df, method: r.method, estimable: !r.aliased,
  })));
}

/** SD of each grouping factor (and slope), then the residual: factor, term, sd, variance, share, lower, upper. */
export function groupSdTable(fit: FitResult): ColumnTable {
  const total = fit.random.filter((r) => r.term === 'intercept' || r.factor === 'residual').reduce((a, r) => a + r.variance, 0);
  return aq.from(fit.random.map((r) => ({
    factor: r.factor, term: r.term === '' ? 'within levels' : r.term, sd: r.sd, variance: r.variance,
    share: r.term === 'intercept' || r.factor === 'residual' ? r.variance / total : NaN,
    lower: r.lower ?? NaN, upper: r.upper ?? NaN,
  })));
}

/** Predicted effect of every level of each random grouping factor: factor, level, term, effect, sd, lower, upper (±1.96 sd). */
export function groupEffectsTable(fit: FitResult, level = 0.95): ColumnTable {
  const z = normalQuantile(0.5 + level / 2);
  return aq.from(fit.modes.map((m) => ({
    factor: m.factor, level: m.level, term: m.term, effect: m.mode, sd: m.sd, lower: m.mode - z * m.sd, upper: m.mode + z * m.sd,
  })));
}

/** Per-replicate results of a study (ReplicateRow records) as a table. */
export function replicatesTable(rows: readonly ReplicateRow[]): ColumnTable {
  return aq.from(rows as ReplicateRow[]);
}

/** A study's metrics (value and Monte Carlo SE per scenario, variant, parameter, metric) as a table. */
export function metricsTable(rows: readonly MetricRow[]): ColumnTable {
  return aq.from(rows.map((r) => ({ ...r, note: r.note ?? '', nominal: r.nominal ?? NaN })));
}

/**
 * Raw mean deviation and predicted effect of every level of the model's random grouping factors,
 * with the predicted effect's interval (± z · conditional SD). Raw deviation of level g: the
 * predicted effect plus the mean residual of g's observations, i.e. what the level's own data
 * say before the model pulls it towards 0.
 */
export function groupEffectRows(fit: FitResult, data: SurveyData, model: ModelSpec, level = 0.95): GroupEffectRow[] {
  const columns = toColumns(data as Columns);
  const within: Record<string, string> = {};
  for (const g of model.groups ?? []) if (g.within) within[g.factor] = g.within;
  const z = normalQuantile(0.5 + level / 2);
  const sums = new Map<string, { sum: number; n: number }>();
  for (const factor of new Set(fit.modes.map((m) => m.factor))) {
    if (!(factor in columns)) continue;
    for (let k = 0; k < fit.rowIds.length; k++) {
      const label = nestedLabel(columns, factor, fit.rowIds[k], within);
      if (label === null) continue;
      const key = `${factor}\u0000${label}`;
      const s = sums.get(key) ?? { sum: 0, n: 0 };
      s.sum += fit.residuals[k];
      s.n++;
      sums.set(key, s);
    }
  }
  return fit.modes.map((m) => {
    const s = sums.get(`${m.factor}\u0000${m.level}`);
    return {
      factor: m.factor, level: m.level, term: m.term, predicted: m.mode, lower: m.mode - z * m.sd, upper: m.mode + z * m.sd,
      // raw mean deviation only where residuals share the effects' scale (normal fits); a count or
      // detection fit's residuals are on the response scale, its effects on the link scale
      raw: s && m.term === 'intercept' && !fit.response ? m.mode + s.sum / s.n : NaN, n: s?.n ?? 0,
    };
  });
}
