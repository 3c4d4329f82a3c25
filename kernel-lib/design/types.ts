/**
 * The survey design: the layout of a grouped field survey, the truth that generates its
 * responses, the analysis variants to compare, and a grid of scenarios. The JSON form is
 * SurveyDesignSpec; parseDesign (./parse) checks it and returns a SurveyDesign with every
 * default filled in and everything the simulator needs worked out.
 */
import type { ModelSpec, ResolvedModel } from '../model/types';

// ---------------------------------------------------------------------------------------------
// JSON form

export interface FactorSpec {
  name: string;
  /** Number of levels; for a nested factor, levels per level of the outer factor. */
  levels: number;
  /** Outer factor this one is nested in. Without it, factors are crossed. */
  within?: string;
  /**
   * Names of the levels in their natural order (e.g. the pilot's years 2021, 2022, 2023), used in
   * the simulated data, coefficient names and charts; crossed factors only. Default: the factor's
   * name and a number ("year1"). With fewer levels the first labels are used; with more, a
   * whole-number series is continued (2024, …) and other labels are followed by the factor's
   * name and number ("site7").
   */
  labels?: (string | number)[];
}

export interface NormalSpec {
  mean: number;
  sd: number;
}

export interface UniformSpec {
  min: number;
  max: number;
}

/**
 * A normal covariate whose values partly vary between levels of `factor`:
 * x = mean + sd · (√share · a_g + √(1 − share) · e), a_g per level g of the factor and e per
 * unit (observation or level of `varies`) both standard normal. The population variance stays
 * sd², and the share `share` of it lies between levels of the factor (intraclass correlation).
 * With `correlation` ρ, a_g = ρ·z_g + √(1 − ρ²)·f_g where z_g is the factor's standardised true
 * random intercept at level g: the covariate's between-level part is then correlated with the
 * group effect, which confounds a random-intercept slope (Hausman 1978, Econometrica 46:1251).
 */
export interface BetweenSpec {
  factor: string;
  /** In [0, 1]. */
  share: number;
  /** In [-1, 1]; needs a random intercept SD for `factor` in truth.sd. Default 0. */
  correlation?: number;
}

export interface CovariateSpec {
  name: string;
  /** "observation" (a new value per row) or a factor name (one value per level of that factor). */
  varies: string;
  /** Exactly one of normal, uniform, categories. */
  normal?: NormalSpec;
  uniform?: UniformSpec;
  /** Category label -> probability (summing to 1). Reference level: first label in sorted order. */
  categories?: Record<string, number>;
  /** Only with `normal`: the share of its variance between levels of a factor, and its correlation with that factor's effects. */
  between?: BetweenSpec;
  /**
   * Only with `categories`: "random" draws each unit's category independently; "balanced" gives
   * the categories to exactly round(probability × units) units (largest remainders), shuffled anew in
   * each replicate — as a survey that picks 3 grazed and 3 ungrazed sites. Default "random".
   */
  allocation?: 'random' | 'balanced';
}

/**
 * Unequal numbers of observations: cells under level j of `factor` hold sizes[j] observations
 * instead of perCell. With `cv` instead of sizes, sizes are perCell · m_j rounded (at least 1),
 * m_j log-normal with mean 1 and coefficient of variation cv, drawn once from the design seed
 * so the layout is the same in every replicate (a survey's layout is fixed; its values vary).
 */
export interface UnequalSpec {
  factor: string;
  sizes?: number[];
  cv?: number;
}

export interface TruthSpec {
  /**
   * Coefficients of the data-generating linear predictor, by coefficient name: "intercept",
   * a numeric covariate ("rain"), a non-reference level ("habitat=wet", "year=year2"), or a
   * two-way product of those ("rain:habitat=wet"). Missing coefficients are 0.
   */
  fixed?: Record<string, number>;
  /** Standard deviation of the random intercept by factor name, and family parameters (`residual`). */
  sd: Record<string, number>;
  /** Random-slope SDs: factor -> numeric covariate -> SD of that covariate's slope across levels. */
  slopes?: Record<string, Record<string, number>>;
  /** Correlations of a factor's random effects: factor -> "intercept:rain" (or "a:b" of two slopes) -> r. Default 0. */
  correlations?: Record<string, Record<string, number>>;
}

export interface VariantSpec {
  name: string;
  model: ModelSpec;
}

export type GridValue = number | string;

export interface TrialsRangeSpec {
  min: number;
  max: number;
  /** Column the drawn trials are written to. Default "trials". */
  column?: string;
}

export interface SurveyDesignSpec {
  seed: number | string;
  replicates: number;
  factors: FactorSpec[];
  /** Observations per cell (each combination of levels, nested levels included). Default 1. */
  perCell?: number;
  /** Probability that an observation is dropped, in [0, 1). Default 0. */
  missing?: number;
  /** Name of the response column. Default "y". */
  response?: string;
  /** Response family. Default "gaussian". */
  family?: string;
  /**
   * Binomial designs: trials per observation (default 1: presence/absence), or a range
   * `{ "min": 2, "max": 6, "column": "visits" }`: a whole number drawn uniformly from min..max for
   * each observation, written to the column (default "trials") that binomial variants name as `trials`.
   */
  trials?: number | TrialsRangeSpec;
  /**
   * Count and detection designs: a numeric covariate added to the linear predictor with
   * coefficient 1, as a model's `offset` (e.g. the log of survey effort: mean counts then scale with effort).
   */
  offset?: string;
  covariates?: CovariateSpec[];
  unequal?: UnequalSpec;
  truth: TruthSpec;
  variants: VariantSpec[];
  /** Dotted path into this JSON -> values to try (see ./grid). */
  grid?: Record<string, GridValue[]>;
}

// ---------------------------------------------------------------------------------------------
// Resolved form

export interface ResolvedFactor {
  name: string;
  /** Levels per outer level (as given). */
  levels: number;
  within?: string;
  /** Levels in the whole survey: levels × (outer factor's total). */
  totalLevels: number;
  /** Label of each level, e.g. "site01"; sorted text order equals level order. */
  labels: string[];
  /** For a nested factor: the outer factor's level of each of this factor's levels. */
  outerLevel?: Int32Array;
}

export type ResolvedCovariate =
  | { kind: 'normal'; name: string; varies: string; mean: number; sd: number; between?: Required<BetweenSpec> }
  | { kind: 'uniform'; name: string; varies: string; min: number; max: number }
  | { kind: 'categorical'; name: string; varies: string; levels: string[]; probabilities: number[]; allocation: 'random' | 'balanced' };

/** One factor of a truth term: a numeric column, or the indicator of one level of a text column. */
export type TruthPart = { kind: 'numeric'; column: string } | { kind: 'level'; column: string; level: string };

export interface TruthTerm {
  /** Name as written in truth.fixed. */
  name: string;
  /** Order-free form ("a:b" sorted), used to match model coefficients. */
  canonical: string;
  value: number;
  /** Empty for the intercept. */
  parts: TruthPart[];
}

/** Random effects of one factor: intercept and slopes with their covariance. */
export interface RandomTruth {
  factor: string;
  /** "intercept", then slope covariate names. */
  terms: string[];
  sd: number[];
  /** k × k correlation matrix, row-major. */
  correlation: Float64Array;
  /** Lower-triangular L with L Lᵀ = covariance, row-major k × k (zero columns where a variance is 0). */
  cholesky: Float64Array;
}

export interface ResolvedTruth {
  fixed: Record<string, number>;
  sd: Record<string, number>;
  slopes: Record<string, Record<string, number>>;
  correlations: Record<string, Record<string, number>>;
  terms: TruthTerm[];
  random: RandomTruth[];
  /** Family parameters (e.g. residual). */
  familyParams: Record<string, number>;
}

export interface ResolvedVariant {
  name: string;
  model: ResolvedModel;
  /** Fixed-effect coefficient names the variant estimates. */
  coefficients: string[];
  /**
   * Grouping factors entered as fixed: their level names as the model sees them (sorted; "outer/own"
   * with `within`), the design level (label order) of each, and the reference name.
   */
  fixedGroups: { factor: string; levels: string[]; designLevel: number[]; reference: string }[];
  /** Truth of each coefficient from truth.fixed (0 where it names none). */
  truth: Record<string, number>;
  /**
   * Coefficients whose target can differ in each replicate: with a grouping factor entered as fixed,
   * the intercept, its level coefficients and products with them, and the main slopes of its
   * random-slope covariates estimate realised effects and absorbed covariates (see TargetProjector
   * in ./realised-truth), not the values in `truth`.
   */
  realised: string[];
}

export interface GridAxis {
  path: string;
  values: GridValue[];
}

export interface SurveyDesign {
  seed: number | string;
  replicates: number;
  response: string;
  family: string;
  /** Binomial: trials per observation (1 otherwise); with `trialsRange`, its maximum. */
  trials: number;
  /** Binomial: trials drawn per observation from min..max and written to `column`. */
  trialsRange?: { min: number; max: number; column: string };
  /** Numeric covariate added to the linear predictor with coefficient 1 (count and detection designs). */
  offset?: string;
  factors: ResolvedFactor[];
  perCell: number;
  missing: number;
  covariates: ResolvedCovariate[];
  /** Observations per cell for each level of `factor` (resolved from sizes or cv). */
  unequal?: { factor: string; sizes: number[] };
  truth: ResolvedTruth;
  variants: ResolvedVariant[];
  grid: GridAxis[];
  /** Things worth knowing that do not stop the study (e.g. coefficients without truth). */
  warnings: string[];
  /** A copy of the JSON input with top-level defaults written out, for the grid to rewrite. */
  source: SurveyDesignSpec;
}
