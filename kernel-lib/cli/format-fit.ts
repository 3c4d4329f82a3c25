import type { FitResult } from '../fit/result';
import { formatNumber, renderTable } from './text-table';

/** The JSON document printed by `quadrat fit --json` (documented in DEVELOPERS.md). */
export function fitToJson(fit: FitResult, level: number) {
  const num = (v: number) => (Number.isFinite(v) ? v : null);
  return {
    estimation: fit.estimation,
    observations: fit.observations,
    droppedRows: fit.droppedRows,
    levels: fit.levels,
    level,
    fixed: fit.fixed.map((r) => ({
      term: r.term, estimate: num(r.estimate), se: num(r.se), lower: num(r.lower), upper: num(r.upper),
      df: Number.isFinite(r.df) ? r.df : null, method: r.method, aliased: r.aliased, ...(r.note ? { note: r.note } : {}),
    })),
    random: fit.random.filter((r) => r.factor !== 'residual').map((r) => ({
      factor: r.factor, term: r.term, sd: num(r.sd), ...(r.lower === undefined ? {} : { lower: num(r.lower), upper: num(r.upper ?? NaN) }),
    })),
    correlations: fit.correlations.map((c) => ({ factor: c.factor, terms: c.terms, value: num(c.value) })),
    residualSd: num(fit.residualSd),
    ...residualInterval(fit, num),
    logLik: num(fit.logLik),
    aic: num(fit.aic),
    bic: num(fit.bic),
    converged: fit.converged,
    singular: fit.singular,
    failure: fit.failure,
    warnings: fit.warnings,
  };
}

/** A readable summary of one fit for the terminal. */
export function formatFit(fit: FitResult, level: number, title = 'Fit'): string {
  const levels = Object.entries(fit.levels).map(([f, k]) => `${f}: ${k} levels`).join(', ');
  const status = fit.failure ? `NOT FITTED: ${fit.failure}` : [
    fit.converged ? 'converged' : 'NOT CONVERGED',
    fit.singular ? 'singular (a variance at zero)' : 'not singular',
  ].join(' · ');
  const out: string[] = [];
  out.push(`${title} · ${fit.estimation} · ${fit.observations} observations${fit.droppedRows ? ` (${fit.droppedRows} rows dropped for missing values)` : ''}`);
  if (levels) out.push(levels);
  out.push(status, '');
  const method = fit.fixed[0]?.method ?? 'wald';
  // a df column for t-based intervals (residual-t, Satterthwaite, Kenward-Roger)
  const showDf = fit.fixed.some((r) => !r.aliased && Number.isFinite(r.df));
  const pct = Math.round(level * 100);
  out.push(`Fixed effects (${pct}% ${method} intervals${showDf ? ', t quantiles on df' : ''})`);
  out.push(renderTable(
    ['term', 'estimate', 'SE', 'lower', 'upper', ...(showDf ? ['df'] : [])],
    fit.fixed.map((r) => r.aliased
      ? [r.term, 'not estimable', '', '', '', ...(showDf ? [''] : [])]
      : [r.term, r.estimate, r.se, r.lower, r.upper, ...(showDf ? [r.df] : [])]),
  ));
  const vcIntervals = fit.random.some((r) => r.lower !== undefined);
  out.push('', vcIntervals ? `Variance components (${pct}% ${method} intervals for the SD)` : 'Variance components');
  out.push(renderTable(
    ['factor', 'term', 'SD', 'variance', ...(vcIntervals ? ['SD lower', 'SD upper'] : [])],
    fit.random.map((r) => [r.factor, r.term, r.sd, r.variance, ...(vcIntervals ? [r.lower ?? NaN, r.upper ?? NaN] : [])]),
  ));
  if (fit.correlations.length) {
    out.push('', 'Correlations');
    out.push(renderTable(['factor', 'between', 'correlation'], fit.correlations.map((c) => [c.factor, c.terms.join(' & '), c.value])));
  }
  const ll = fit.estimation === 'REML' ? 'REML log-likelihood' : 'log-likelihood';
  out.push('', `${ll} ${formatNumber(fit.logLik, 6)} · AIC ${formatNumber(fit.aic, 6)} · BIC ${formatNumber(fit.bic, 6)}`);
  if (fit.warnings.length) out.push('', 'Warnings', ...fit.warnings.map((w) => `  - ${w}`));
  return out.join('\n');
}

/** The residual SD interval for the JSON output, when the method gave one. */
function residualInterval(fit: FitResult, num: (v: number) => number | null) {
  const r = fit.random.find((x) => x.factor === 'residual');
  return r?.lower === undefined ? {} : { residualSdLower: num(r.lower), residualSdUpper: num(r.upper ?? NaN) };
}
