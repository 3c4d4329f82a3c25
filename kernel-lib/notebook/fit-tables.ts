/** Fits side by side as table rows: fixed effects with their intervals, and the SDs of the variance components. */
import type { FitResult } from '../fit/result';
import { remlComparisonCaution } from '../fit/comparison';
import { involvesLevelOf, isLevelOf } from '../model/terms';

export interface NamedFitResult {
  name: string;
  fit: FitResult;
}

export interface FixedEffectTableRow {
  term: string;
  fit: string;
  estimate: number;
  se: number;
  lower: number;
  upper: number;
  /** upper − lower. */
  width: number;
  /** Degrees of freedom (Infinity for Wald; NaN when the method has none). */
  df: number;
  method: string;
  /** The true value, when known (simulated data). */
  truth?: number;
  note: string;
}

/**
 * One row per fit and fixed-effect term, terms in order of first appearance across the fits and
 * fits in the order given. Level terms of the `fixedFactors` (`year=2022`) are left out unless
 * `includeGroupLevels`. `truth` (coefficient name -> value) adds a column when given. In a fit
 * where one of `fixedFactors` is entered as fixed, the intercept refers to that factor's
 * reference level, another quantity than the overall intercept: its truth is left empty and a
 * note says so.
 */
export function fixedEffectRows(
  fits: readonly NamedFitResult[],
  options: { truth?: Readonly<Record<string, number>>; includeGroupLevels?: boolean; fixedFactors?: readonly string[] } = {},
): FixedEffectTableRow[] {
  const hidden = (term: string) =>
    !options.includeGroupLevels && (options.fixedFactors ?? []).some((f) => involvesLevelOf(term, f));
  const terms: string[] = [];
  for (const { fit } of fits) for (const r of fit.fixed) if (!terms.includes(r.term) && !hidden(r.term)) terms.push(r.term);
  const rows: FixedEffectTableRow[] = [];
  for (const term of terms) {
    for (const { name, fit } of fits) {
      const r = fit.fixed.find((x) => x.term === term);
      if (!r) continue;
      const enteredFixed = (options.fixedFactors ?? []).filter((f) => fit.fixed.some((x) => isLevelOf(x.term, f)));
      const shifted = term === 'intercept' && enteredFixed.length > 0;
      const note = r.aliased
        ? 'not estimable (aliased)'
        : fit.failure
          ? `fit failed: ${fit.failure}`
          : shifted
            ? `refers to the reference level of ${enteredFixed.join(', ')}`
            : '';
      const row: FixedEffectTableRow = {
        term, fit: name, estimate: r.estimate, se: r.se, lower: r.lower, upper: r.upper, width: r.upper - r.lower, df: r.df,
        method: r.method, note,
      };
      if (options.truth) row.truth = shifted ? NaN : options.truth[term] ?? NaN;
      rows.push(row);
    }
  }
  return rows;
}

/**
 * One row per variance component (`sd(site)`, ..., `sd(residual)`; slopes as `sd(site: rain)`),
 * a column of SDs per fit ('fixed' where the fit entered that factor as fixed, '–' where it has no
 * such component otherwise), and a `truth` column when `truthSd` (factor or "residual" -> SD) is given.
 */
export function varianceRows(
  fits: readonly NamedFitResult[],
  truthSd?: Readonly<Record<string, number>>,
): Record<string, string | number>[] {
  const label = (factor: string, term: string) => (factor === 'residual' || term === 'intercept' ? `sd(${factor})` : `sd(${factor}: ${term})`);
  const keys: { key: string; factor: string; term: string }[] = [];
  for (const { fit } of fits) {
    for (const r of fit.random) {
      const key = label(r.factor, r.term);
      if (!keys.some((k) => k.key === key)) keys.push({ key, factor: r.factor, term: r.term });
    }
  }
  // the residual last, whatever order the fits list it in
  keys.sort((a, b) => Number(a.factor === 'residual') - Number(b.factor === 'residual'));
  return keys.map(({ key, factor, term }) => {
    const row: Record<string, string | number> = { component: key };
    if (truthSd) row.truth = term === 'intercept' || factor === 'residual' ? truthSd[factor] ?? NaN : NaN;
    for (const { name, fit } of fits) {
      const r = fit.random.find((x) => label(x.factor, x.term) === key);
      row[name] = r ? r.sd : fit.fixed.some((x) => isLevelOf(x.term, factor)) ? 'fixed' : '–';
    }
    return row;
  });
}

const AIC_NOT_COMPARABLE = 'AIC not comparable with the other fits: REML with a different fixed part (refit with ML to compare)';

/**
 * One row per fit: observations, flags, AIC and warnings, for a "how did the fits go" table.
 * When the fits' AIC cannot be compared (REML with different fixed parts) every row says so.
 */
export function fitStatusRows(fits: readonly NamedFitResult[]): Record<string, string | number>[] {
  const caution = remlComparisonCaution(fits.map((f) => f.fit));
  return fits.map(({ name, fit }) => ({
    fit: name,
    estimation: fit.estimation,
    observations: fit.observations,
    'dropped rows': fit.droppedRows,
    converged: fit.converged ? 'yes' : 'no',
    singular: fit.singular ? 'yes' : 'no',
    AIC: fit.aic,
    warnings: [...fit.warnings, ...(caution ? [AIC_NOT_COMPARABLE] : [])].join('; ') || 'none',
  }));
}
