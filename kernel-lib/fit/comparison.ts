/** Cautions for comparing fits of the same data by log-likelihood, AIC or BIC. */
import type { FitResult } from './result';

/**
 * REML maximises the likelihood of residual contrasts that depend on the fixed-effect columns, so
 * REML log-likelihoods (and AIC, BIC) of fits with different fixed parts are likelihoods of
 * different data and cannot be compared (Verbeke and Molenberghs 2000, Linear Mixed Models for
 * Longitudinal Data, §6.2.1). Returns the caution when it applies to `fits`, else undefined.
 */
export function remlComparisonCaution(fits: readonly FitResult[]): string | undefined {
  const reml = fits.filter((f) => f.estimation === 'REML');
  if (reml.length === 0 || fits.length < 2) return undefined;
  const fixedPart = (f: FitResult) => f.fixed.filter((r) => !r.aliased).map((r) => r.term).sort().join('\n');
  const first = fixedPart(fits[0]);
  if (fits.every((f) => fixedPart(f) === first)) return undefined;
  return (
    'Caution: these fits have different fixed parts and at least one is REML; REML log-likelihoods, AIC and BIC ' +
    'are not comparable across different fixed parts. To compare fixed parts by AIC, refit every model with "estimation": "ML".'
  );
}
