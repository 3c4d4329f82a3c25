/**
 * The one model description that travels through Quadrat: fitted to a real survey,
 * to every simulated data set, and used as an analysis variant in a study.
 * The same shape is accepted as JSON (see parseModel in ./parse).
 */

import type { IntervalMethod } from './interval-rule';

/** How a grouping factor enters the model. */
export type GroupRole = 'random' | 'fixed';

export type Estimation = 'REML' | 'ML';

/** What to do with rows that have a missing value in a column the model uses. */
export type MissingPolicy = 'drop' | 'reject';

export interface GroupSpec {
  /** Column holding the grouping factor (levels are compared as strings). */
  factor: string;
  /** `random`: variance component(s); `fixed`: dummy-coded (treatment coding) into the fixed part. */
  as: GroupRole;
  /**
   * Name of the factor this one is nested in. The level identity becomes the pair
   * (outer level, own level), so plot "1" of site A differs from plot "1" of site B.
   */
  within?: string;
  /** Numeric fixed-part columns whose slopes vary by this factor. Default: none. */
  slopes?: string[];
  /**
   * Numeric fixed terms entered as their mean per level of this factor plus the deviation from
   * it (the within-between split; Bell and Jones 2015, Political Science Research and Methods
   * 3:133): the coefficient of `x` is then the within-level slope and `x_mean_site` the
   * between-level slope. Default: none.
   */
  split?: string[];
  /** With slopes: whether intercept and slopes are correlated. Default: true. */
  correlated?: boolean;
  /** Reference level when `as: "fixed"`. Default: first level in sorted order. */
  reference?: string;
}

/** A categorical column with a chosen reference level. */
export interface CategoricalTerm {
  column: string;
  /** Default: the first level in sorted order. */
  reference?: string;
}

/**
 * A fixed term: a column name (numeric columns enter as is, text columns are treated
 * as categorical), `a:b` for a two-way interaction, or an object to set a reference level.
 */
export type FixedTerm = string | CategoricalTerm;

/** Distribution of the response given the random effects (links: identity, log, logit, log). */
export type ResponseFamilyName = 'gaussian' | 'poisson' | 'binomial' | 'negative-binomial';

/** How a non-normal mixed model's likelihood is integrated over the random effects. */
export type Integration = 'laplace' | 'quadrature';

export interface ModelSpec {
  response: string;
  /**
   * Default 'gaussian'. 'poisson' and 'negative-binomial' (NB2, variance μ + μ²/k) for counts, log
   * link; 'binomial' for detections (successes out of `trials`), logit link. Non-normal families are
   * fitted by ML with Wald z intervals by default ('profile' and 'bootstrap' also apply).
   */
  family?: ResponseFamilyName;
  /** Binomial only: a column of trial counts or one positive whole number. Default 1 (presence/absence). */
  trials?: string | number;
  /** Count families: a numeric column added to the linear predictor, e.g. log(effort) for unequal effort. */
  offset?: string;
  /** Non-normal mixed models: 'laplace' (default, any grouping structure) or 'quadrature' (one random intercept). */
  integration?: Integration;
  /** Adaptive Gauss-Hermite nodes with 'quadrature'. Default 9. */
  nodes?: number;
  /** Fixed terms. Default: []. */
  fixed?: FixedTerm[];
  /**
   * Whether the fixed part has an intercept. Default: true. With false the regression goes
   * through the origin, and the first categorical main effect gets one coefficient per level.
   */
  intercept?: boolean;
  /** Grouping factors. Default: [] (ordinary least squares). */
  groups?: GroupSpec[];
  /** Default: 'REML'. */
  estimation?: Estimation;
  /** Columns to treat as categorical even when their values look numeric. Default: []. */
  categorical?: string[];
  /** Default: 'drop' (dropped rows are counted in the result). */
  missing?: MissingPolicy;
  /** Interval method for fixed effects. Default: 'satterthwaite'. */
  interval?: string;
  /** Interval level. Default: 0.95. */
  level?: number;
}

/** A model description with every default filled in. */
export interface ResolvedModel {
  response: string;
  family: ResponseFamilyName;
  /** Binomial only (default 1). */
  trials?: string | number;
  offset?: string;
  /** Non-normal families only. */
  integration?: Integration;
  /** With 'quadrature' only. */
  nodes?: number;
  fixed: FixedTerm[];
  intercept: boolean;
  groups: GroupSpec[];
  estimation: Estimation;
  categorical: string[];
  missing: MissingPolicy;
  /** Checked against the family and estimation (./interval-rule). */
  interval: IntervalMethod;
  level: number;
}
