import type { FitResult } from '../fit/result';
import { formatNumber, renderTable, type Cell } from '../display/text-table';
import { responseBlocks, responseHeader, responseJson } from './format-response';

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
    ...responseJson(fit, num),
  };
}

/** How a grouping factor entered the model, for the printed fit (optional: names nesting and fixed factors). */
export interface FitLayoutModel {
  groups: readonly { factor: string; as: 'random' | 'fixed'; within?: string }[];
}

const BAR_WIDTH = 20;

/** A bar of eighth blocks for a share in [0, 1]. */
function shareBar(share: number): string {
  if (!Number.isFinite(share) || share <= 0) return '';
  const eighths = Math.round(Math.min(1, share) * BAR_WIDTH * 8);
  const partial = ['', '▏', '▎', '▍', '▌', '▋', '▊', '▉'][eighths % 8];
  return '█'.repeat(Math.floor(eighths / 8)) + partial;
}

/** A share as a right-aligned percentage and its bar: " 18%  ███▋". */
function shareCell(share: number): string {
  if (!Number.isFinite(share)) return '—';
  const p = share * 100;
  return `${`${p > 0 && p < 1 ? '<1' : Math.round(p)}%`.padStart(4)}  ${shareBar(share)}`;
}

const METHOD_WORDS: Record<string, string> = {
  wald: 'Wald, normal quantiles',
  'residual-t': 't quantiles on the residual df',
  satterthwaite: 'Satterthwaite df',
  'kenward-roger': 'Kenward-Roger df and covariance',
  profile: 'profile likelihood',
  bootstrap: 'parametric bootstrap percentiles',
};

/**
 * A readable summary of one fit for the terminal, in the order a field user reads it: where the
 * variation lies (each grouping factor with its levels, SD and share of the variance, then the
 * variation within levels), then the effects with their intervals, then how the fit went.
 */
export function formatFit(fit: FitResult, level: number, title = 'Fit', model?: FitLayoutModel): string {
  const pct = Math.round(level * 100);
  const method = fit.fixed[0]?.method ?? 'wald';
  const out: string[] = [];
  out.push(title);
  out.push(`${fit.observations} observations used${fit.droppedRows ? `, ${fit.droppedRows} rows dropped for missing values` : ''} · ${fit.estimation === 'OLS' ? 'least squares (every grouping factor fixed)' : fit.estimation}`);
  const header = responseHeader(fit);
  if (header) out.push(header);
  if (fit.failure) out.push(`NOT FITTED: ${fit.failure}`);

  // Where the variation lies. Shares use the intercept variances and the residual: a slope's
  // contribution depends on the covariate's values, so slopes get an SD without a share.
  const residual = fit.random.find((r) => r.factor === 'residual');
  const intercepts = fit.random.filter((r) => r.factor !== 'residual' && r.term === 'intercept');
  const total = intercepts.reduce((a, r) => a + r.variance, 0) + (residual?.variance ?? 0);
  const within = (f: string) => model?.groups.find((g) => g.factor === f)?.within;
  const sourceName = (f: string, term: string) => {
    const w = within(f);
    const levels = `levels of ${f}${w ? `, within ${w}` : ''}`;
    return term === 'intercept' ? `between ${levels}` : `slope of ${term}, between ${levels}`;
  };
  const sdIntervals = fit.random.some((r) => r.lower !== undefined);
  const interval = (r: { lower?: number; upper?: number }) =>
    r.lower === undefined ? '' : `${formatNumber(r.lower)} to ${formatNumber(r.upper ?? NaN)}`;
  const rows: Cell[][] = [];
  for (const r of fit.random) {
    if (r.factor === 'residual') continue;
    // count families have no residual variance on the link scale, so no shares of a total
    const share = r.term === 'intercept' && residual ? r.variance / total : NaN;
    rows.push([sourceName(r.factor, r.term), String(fit.levels[r.factor] ?? ''), r.sd, r.term === 'intercept' ? shareCell(share) : `  (varies with ${r.term})`, ...(sdIntervals ? [interval(r)] : [])]);
  }
  for (const g of model?.groups ?? []) {
    if (g.as === 'fixed') rows.push([`levels of ${g.factor}: fixed effects`, String(fit.levels[g.factor] ?? ''), '', '  (see effects)', ...(sdIntervals ? [''] : [])]);
  }
  if (residual) {
    const share = residual.variance / total;
    rows.push(['within levels (residual)', '', residual.sd, shareCell(share), ...(sdIntervals ? [interval(residual)] : [])]);
  }
  out.push('', fit.response
    ? `Where the variation lies (SD on the ${fit.response.link} scale; no residual variance on that scale, so no shares)`
    : `Where the variation lies (SD on the response scale; share of the total variance)`);
  out.push(renderTable(['source', 'levels', 'SD', 'share', ...(sdIntervals ? [`${pct}% interval of SD`] : [])], rows));
  for (const c of fit.correlations) {
    out.push(`  correlation of ${c.terms[0]} and ${c.terms[1]} effects between ${c.factor} levels: ${formatNumber(c.value, 3)}`);
  }

  // The effects, with their intervals.
  const showDf = fit.fixed.some((r) => !r.aliased && Number.isFinite(r.df));
  out.push('', `Effects with ${pct}% intervals (${METHOD_WORDS[method] ?? method})`);
  out.push(renderTable(
    ['effect', 'estimate', `${pct}% interval`, 'SE', ...(showDf ? ['df'] : [])],
    fit.fixed.map((r) => r.aliased
      ? [r.term, 'not estimable (a combination of other columns)', '', '', ...(showDf ? [''] : [])]
      : [r.term, r.estimate, `${formatNumber(r.lower)} to ${formatNumber(r.upper)}`, r.se, ...(showDf ? [Number.isFinite(r.df) ? r.df.toFixed(1) : '∞'] : [])]),
  ));
  out.push(...responseBlocks(fit, level));

  // How the fit went.
  out.push('', 'Fit diagnostics');
  out.push(`  ${fit.converged ? `converged (${fit.evaluations} evaluations)` : 'DID NOT CONVERGE: treat the estimates with care'}; ${fit.singular ? 'a variance sits at zero (boundary fit): the data show no variation from that source' : 'no variance at its boundary'}`);
  const ll = fit.estimation === 'REML' ? 'REML log-likelihood' : 'log-likelihood';
  out.push(`  ${ll} ${formatNumber(fit.logLik, 6)} · AIC ${formatNumber(fit.aic, 6)} · BIC ${formatNumber(fit.bic, 6)} · ${fit.parameters} parameters`);
  for (const w of fit.warnings) out.push(`  warning: ${w}`);
  return out.join('\n');
}

/** The residual SD interval for the JSON output, when the method gave one. */
function residualInterval(fit: FitResult, num: (v: number) => number | null) {
  const r = fit.random.find((x) => x.factor === 'residual');
  return r?.lower === undefined ? {} : { residualSdLower: num(r.lower), residualSdUpper: num(r.upper ?? NaN) };
}
