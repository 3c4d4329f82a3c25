/**
 * The floor on small-sample degrees of freedom. Below one df the t reference has no mean and its
 * quantiles grow without bound (t at 0.975 is 12.7 with 1 df, 165 with 0.5 and 1.7e12 with
 * 0.1; scipy.stats.t.ppf), so an interval there reflects the df approximation rather than the data: it is reported
 * as not available, with the reason, and the fit carries a warning.
 */
import type { FixedEffectRow } from './result';

export const DF_FLOOR = 1;
/** Computed df carry the optimiser's error: a design whose exact df is 1 may give 0.9999998. */
const DF_TOLERANCE = 1e-3;

/**
 * Blank the intervals of rows whose df fell below DF_FLOOR; returns one warning per such row. Rows
 * left without a finite interval for another reason (df not computable) get a note too.
 */
export function applyDfFloor(rows: FixedEffectRow[]): string[] {
  const warnings: string[] = [];
  for (const r of rows) {
    if (r.aliased) continue;
    if (!(r.df < DF_FLOOR - DF_TOLERANCE)) {
      if (Number.isFinite(r.estimate) && !(Number.isFinite(r.lower) && Number.isFinite(r.upper))) {
        r.note = Number.isNaN(r.df) && (r.method === 'satterthwaite' || r.method === 'kenward-roger')
          ? `interval not available: ${r.method} df could not be computed (see warnings)`
          : 'interval not available (see warnings)';
      }
      continue;
    }
    r.note = `interval not available: ${r.method} df ${r.df.toPrecision(2)} is below the floor of ${DF_FLOOR}`;
    r.lower = NaN;
    r.upper = NaN;
    warnings.push(`${r.term}: ${r.note} (too little information in the data for this coefficient's interval)`);
  }
  return warnings;
}
