import type { FitResult } from '../fit/result';
import { remlComparisonCaution } from '../fit/comparison';
import { renderTable, type Cell } from '../display/text-table';

/** Side-by-side fixed effects and variance components of several fits of the same data. */
export function formatComparison(fits: { name: string; fit: FitResult }[]): string {
  const terms: string[] = [];
  for (const { fit } of fits) for (const r of fit.fixed) if (!terms.includes(r.term)) terms.push(r.term);
  const rows: Cell[][] = [];
  for (const term of terms) {
    for (const { name, fit } of fits) {
      const r = fit.fixed.find((f) => f.term === term);
      if (!r) continue;
      rows.push(r.aliased
        ? [term, name, 'not estimable', '', '', '', '']
        : [term, name, r.estimate, r.se, r.lower, r.upper, r.upper - r.lower]);
    }
  }
  const out = ['Effects', renderTable(['effect', 'model', 'estimate', 'SE', 'lower', 'upper', 'width'], rows)];
  const vc: Cell[][] = [];
  for (const { name, fit } of fits) {
    for (const r of fit.random) {
      const source = r.factor === 'residual' ? 'within levels (residual)' : r.term === 'intercept' ? `between levels of ${r.factor}` : `slope of ${r.term}, between levels of ${r.factor}`;
      vc.push([name, source, r.sd]);
    }
  }
  out.push('', 'Where the variation lies (SD)', renderTable(['model', 'source', 'SD'], vc));
  const info: Cell[][] = fits.map(({ name, fit }) => [
    name, fit.estimation, fit.converged ? 'yes' : 'NO', fit.singular ? 'yes' : 'no', fit.logLik, fit.aic,
  ]);
  out.push('', renderTable(['model', 'estimation', 'converged', 'variance at zero', 'log-likelihood', 'AIC'], info));
  const caution = remlComparisonCaution(fits.map((f) => f.fit));
  if (caution) out.push('', caution);
  return out.join('\n');
}
