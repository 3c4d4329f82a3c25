/**
 * Responses of extreme magnitude (e.g. ×1e±300) are fitted on a power-of-two scale, which is exact
 * in binary floating point, and the results scaled back; squares of such values would overflow
 * or underflow double precision.
 */
import type { DesignMatrices } from '../data/design-matrices';
import type { FitResult } from './result';

/** Rescale only beyond these magnitudes: ordinary data keep their exact arithmetic. */
const LARGE = 2 ** 200;
const SMALL = 2 ** -200;

/** The power of two to multiply y by before fitting (1 when y needs no scaling). */
export function responseScale(y: Float64Array): number {
  let max = 0;
  for (let i = 0; i < y.length; i++) {
    const a = Math.abs(y[i]);
    if (a > max) max = a;
  }
  if (!(max > LARGE || (max > 0 && max < SMALL))) return 1;
  return 2 ** -Math.round(Math.log2(max));
}

/** The design with y multiplied by `scale`. */
export function scaledResponse(design: DesignMatrices, scale: number): DesignMatrices {
  const y = new Float64Array(design.y.length);
  for (let i = 0; i < y.length; i++) y[i] = design.y[i] * scale;
  return { ...design, y };
}

/**
 * A fit of scale·y turned into the fit of y: location and scale quantities divided by `scale`,
 * variances by scale², and the log-likelihood moved by the Jacobian, (n or n − p)·log(scale)
 * (the REML criterion is a density of n − p error contrasts).
 */
export function unscaleFit(fit: FitResult, scale: number): FitResult {
  const c = 1 / scale;
  for (const r of fit.fixed) {
    r.estimate *= c;
    r.se *= c;
    r.lower *= c;
    r.upper *= c;
  }
  for (let i = 0; i < fit.fixedCov.length; i++) fit.fixedCov[i] *= c * c;
  for (const r of fit.random) {
    r.sd *= c;
    r.variance *= c * c;
    if (r.lower !== undefined) r.lower *= c;
    if (r.upper !== undefined) r.upper *= c;
  }
  for (const m of fit.modes) {
    m.mode *= c;
    m.sd *= c;
  }
  for (let i = 0; i < fit.fitted.length; i++) fit.fitted[i] *= c;
  for (let i = 0; i < fit.residuals.length; i++) fit.residuals[i] *= c;
  fit.residualSd *= c;
  const estimable = fit.fixed.filter((r) => !r.aliased).length;
  const count = fit.estimation === 'REML' ? fit.observations - estimable : fit.observations;
  fit.logLik -= count * Math.log(c);
  fit.deviance = -2 * fit.logLik;
  fit.aic = -2 * fit.logLik + 2 * fit.parameters;
  fit.bic = -2 * fit.logLik + Math.log(fit.observations) * fit.parameters;
  return fit;
}
