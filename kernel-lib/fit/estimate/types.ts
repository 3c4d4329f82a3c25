/**
 * The seam between a response family's estimation and everything shared. An estimate step takes
 * the design matrices (with column roles) and returns an `Estimate`: plain numbers on the
 * estimable columns, no names, intervals or result rows. `fit/summarise.ts` turns any Estimate into
 * the FitResult (names, aliased rows, intervals and df, flags, warnings), the same for every family.
 *
 * Normal responses: `./normal.ts` (profiled REML/ML, or ordinary least squares without random terms).
 * A generalised family (e.g. penalised iteratively reweighted least squares with the Laplace
 * approximation or adaptive Gauss-Hermite quadrature) adds one step with this signature and its
 * entry in `./index.ts`; Wald z intervals then come from `beta`/`betaCov` with no further work.
 */
import type { DesignMatrices, RandomTerm } from '../../data/design-matrices';
import type { ConditionalModeRow, FitResult, ResponseSummary } from '../result';
import type { BootstrapSettings, IntervalOutcome, SmallSampleMethod } from '../inference/intervals';

export interface EstimateOptions {
  /** Criterion of a mixed model: 'REML' or 'ML' (a step without REML treats 'REML' as its default). */
  estimation: 'REML' | 'ML';
  /** Column visiting order for aliasing detection (earlier columns are kept); see fit/aliasing.ts. */
  priority: number[];
  /** Starting θ for the optimiser (length must match). */
  start?: ArrayLike<number>;
  /** Compute conditional modes. */
  modes: boolean;
  /** Compute fitted values (response scale). */
  fitted: boolean;
  /** Non-normal families: how the random effects are integrated out, and quadrature nodes. */
  integration?: 'laplace' | 'quadrature';
  nodes?: number;
}

/** Estimated covariance of one random term's k effects, on the scale the family reports. */
export interface TermCovariance {
  term: RandomTerm;
  /** k × k row-major. */
  cov: Float64Array;
  /** True when a diagonal of the relative factor sits on the boundary (a variance or correlation at its limit). */
  boundary: boolean;
}

export interface Estimate {
  /** Criterion reported in the result ('OLS' when there are no random terms). */
  estimation: FitResult['estimation'];
  /** Design columns that could be estimated, and the aliased ones (indices into the full design). */
  estimable: number[];
  aliased: number[];
  /** Why each aliased column cannot be estimated, by coefficient name (fit/alias-reasons.ts). */
  aliasReasons: Record<string, string>;
  /** Why no estimates exist ('' when they do); with a failure only `theta`, `evaluations` and `warnings` count. */
  failure: string;
  /** Warnings of the step (e.g. "did not converge: …"), in the order they arose. */
  warnings: string[];
  converged: boolean;
  /** Deviance evaluations used by the optimiser. */
  evaluations: number;
  /** Relative covariance parameters at the optimum (engine scale). */
  theta: Float64Array;
  /** Criterion minimised, and the log-likelihood with all constants (see FitResult.logLik). */
  deviance: number;
  logLik: number;
  /** Fixed effects and their covariance, estimable columns only (length p, p × p row-major). */
  beta: Float64Array;
  betaCov: Float64Array;
  /** Residual degrees of freedom n − rank(X), for 'residual-t' intervals. */
  residualDf: number;
  /** True when t intervals on `residualDf` are exact (ordinary least squares): every method becomes 'residual-t'. */
  exactT: boolean;
  /** Residual variance σ² of families with one (gaussian); undefined when the family has none. */
  dispersion: number | undefined;
  /** Random-term covariances in the design's term order. */
  terms: TermCovariance[];
  /** Conditional modes (empty unless asked for). */
  modes: ConditionalModeRow[];
  /** Fitted values on the response scale, one per observation (empty unless asked for). */
  fitted: Float64Array;
  /** Count and detection families: what the result reports beyond the shared fields. */
  response?: ResponseSummary;
  /** Parameters beyond β, θ and the dispersion counted in AIC/BIC (the NB aggregation k). */
  extraParameters?: number;
  /** Interval methods beyond Wald and residual-t, when the step supports them (normal responses). */
  smallSample?: (method: SmallSampleMethod, level: number, bootstrap?: BootstrapSettings) => IntervalOutcome;
}

export type EstimateStep = (design: DesignMatrices, options: EstimateOptions) => Estimate;
