/**
 * What the small-sample methods work from: the estimable part of the design, an engine instance
 * factored at the estimate, and the estimates. Built inside fitDesign, or afterwards from a design
 * and its fit (for tests of terms and contrasts).
 */
import type { DesignMatrices } from '../../data/design-matrices';
import type { FitResult } from '../result';
import { ProfiledDeviance } from '../profiled-deviance';
import { restrictColumns } from '../aliasing';
import { QuadratInputError } from '../../model/errors';

export interface InferenceContext {
  /** The design restricted to its estimable columns. */
  design: DesignMatrices;
  /** Engine on `design` with the fit's criterion (REML for OLS fits too: σ² on n − p); factored at theta. */
  dev: ProfiledDeviance;
  estimation: 'REML' | 'ML' | 'OLS';
  theta: Float64Array;
  sigma2: number;
  beta: Float64Array;
  /** Index in the full design of each estimable column. */
  columns: number[];
}

/**
 * A context from a design and the fit made from it. Throws a clear error when the fit failed or
 * does not belong to the design (different columns or criterion value).
 */
export function contextFromFit(design: DesignMatrices, fit: FitResult): InferenceContext {
  if (fit.failure) throw new QuadratInputError(`fit: the fit produced no estimates (${fit.failure}); nothing to test`, { field: 'fit' });
  const names = fit.fixed.map((r) => r.term);
  if (names.length !== design.fixedNames.length || names.some((t, j) => t !== design.fixedNames[j])) {
    throw new QuadratInputError(`fit: its coefficients (${names.join(', ')}) are not the design's columns (${design.fixedNames.join(', ')})`, { field: 'fit' });
  }
  const columns = fit.fixed.flatMap((r, j) => (r.aliased ? [] : [j]));
  const reduced = restrictColumns(design, columns);
  const reml = fit.estimation !== 'ML';
  const dev = new ProfiledDeviance(reduced, reml);
  const theta = Float64Array.from(fit.theta);
  if (theta.length !== dev.thetaLength || !dev.factor(theta)) {
    throw new QuadratInputError(`fit: its variance parameters do not fit this design's random terms`, { field: 'fit' });
  }
  if (fit.estimation !== 'OLS') {
    const again = dev.evaluate(theta);
    if (!(Math.abs(again - fit.deviance) <= 1e-8 * Math.max(1, Math.abs(fit.deviance)))) {
      throw new QuadratInputError(`fit: its criterion (${fit.deviance}) differs from the design's at the same parameters (${again}); was it fitted to this design?`, { field: 'fit' });
    }
  }
  const sigma2 = dev.sigma2();
  const beta = dev.beta();
  return { design: reduced, dev, estimation: fit.estimation, theta, sigma2, beta, columns };
}

/**
 * Run `fn` with the engine's response replaced by the residual y − Xβ̂. The criterion and Φ do not
 * change (a shift of y within the column space of X), but the cross-products lose the large
 * common part of y, so finite differences of the criterion are far less affected by rounding.
 * The response is restored and the engine refactored at θ̂ afterwards.
 */
export function withResidualResponse<T>(ctx: InferenceContext, fn: () => T): T {
  const { design, dev, beta } = ctx;
  const { n, p, X, y } = design;
  const r = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = y[i];
    for (let a = 0; a < p; a++) s -= X[i * p + a] * beta[a];
    r[i] = s;
  }
  dev.setResponse(r);
  try {
    return fn();
  } finally {
    dev.setResponse(y);
    dev.factor(ctx.theta);
  }
}
