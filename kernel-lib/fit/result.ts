/** What a fit returns. Problems are reported in flags and warnings, never by throwing. */

export interface FixedEffectRow {
  term: string;
  estimate: number;
  se: number;
  /** Degrees of freedom of the interval (Infinity for Wald/normal; NaN for profile and bootstrap, which are not t-based). */
  df: number;
  lower: number;
  upper: number;
  /** Interval method used for this row. */
  method: string;
  /** True when the column is a linear combination of earlier columns: estimate/se are NaN. */
  aliased: boolean;
  /** Why lower/upper are NaN although the estimate is there (e.g. df below the floor, fit/df-floor.ts). */
  note?: string;
}

export interface VarianceComponentRow {
  /** Grouping factor, or "residual". */
  factor: string;
  /** "intercept", a slope column name, or "" for the residual. */
  term: string;
  sd: number;
  variance: number;
  /** Interval for the SD at the fit's level, when the interval method gives one ('profile', 'bootstrap'). */
  lower?: number;
  upper?: number;
}

export interface CorrelationRow {
  factor: string;
  terms: [string, string];
  value: number;
}

export interface ConditionalModeRow {
  factor: string;
  level: string;
  term: string;
  /** Conditional mode (BLUP) of the random effect. */
  mode: number;
  /** Conditional SD given the estimated parameters. */
  sd: number;
}

/** What a count or detection fit adds (absent for normal responses). */
export interface ResponseSummary {
  family: 'poisson' | 'binomial' | 'negative-binomial';
  link: 'log' | 'logit';
  /** 'exact' for a GLM (no random terms). */
  integration: 'exact' | 'laplace' | 'quadrature';
  /** Quadrature nodes (1 for Laplace, 0 for a GLM). */
  nodes: number;
  /** Negative binomial aggregation k (variance μ + μ²/k). */
  aggregation?: number;
  /** Pearson χ² = Σ (y − μ)²/V(μ) at the fitted means, its residual df and their ratio (NaN where not meaningful: NB, 0/1 data). */
  pearsonChi2: number;
  residualDf: number;
  overdispersion: number;
}

export interface FitResult {
  /** Count and detection fits only: family, link, integration, aggregation, overdispersion. */
  response?: ResponseSummary;
  estimation: 'REML' | 'ML' | 'OLS';
  observations: number;
  droppedRows: number;
  levels: Record<string, number>;
  fixed: FixedEffectRow[];
  /**
   * Covariance of the estimable fixed effects, p × p row-major (NaN rows/cols for aliased terms);
   * with the 'kenward-roger' interval method, the Kenward-Roger adjusted covariance.
   */
  fixedCov: Float64Array;
  random: VarianceComponentRow[];
  correlations: CorrelationRow[];
  residualSd: number;
  /**
   * Log-likelihood including all constants: for ML (and OLS) the full Gaussian log density of y;
   * for REML −½[(n−p) log 2π + log|V| + log|XᵀV⁻¹X| + rᵀV⁻¹r], i.e. −½ × the REML deviance of
   * Bates and DebRoy (2004). Harville's (1974) error-contrast form adds +½ log|XᵀX|, omitted here.
   */
  logLik: number;
  aic: number;
  bic: number;
  /** Number of parameters counted in AIC/BIC: estimable fixed effects + covariance parameters + residual variance. */
  parameters: number;
  /** Relative covariance parameters θ at the optimum (engine scale). */
  theta: number[];
  /** Criterion minimised: REML or ML deviance (or -2 logLik for OLS). */
  deviance: number;
  converged: boolean;
  singular: boolean;
  /** Why no estimates could be produced ('' when the fit produced estimates). */
  failure: string;
  /** Names of aliased fixed-effect columns. */
  aliased: string[];
  /** Why each aliased column cannot be estimated (an empty interaction cell, or the columns it combines). */
  aliasReasons: Record<string, string>;
  warnings: string[];
  /** Number of deviance evaluations used by the optimiser. */
  evaluations: number;
  modes: ConditionalModeRow[];
  fitted: Float64Array;
  residuals: Float64Array;
  /** Input row number of each observation used. */
  rowIds: Int32Array;
}
