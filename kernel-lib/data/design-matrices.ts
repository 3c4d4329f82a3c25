/**
 * The numeric form of a model applied to a table: what the engine fits.
 * Built once per data shape by data/buildDesign; in a simulation study only `y` changes.
 * The engine reads matrices and column roles only; it never parses names or a model.
 */

/**
 * What one column of X is made of. `kind`: the intercept; a covariate (a numeric column, or a
 * product of numeric columns); one level of a factor (a 0/1 dummy); or an interaction (a product
 * with at least one dummy, e.g. a fixed grouping factor's slope column).
 */
export interface ColumnRole {
  kind: 'intercept' | 'covariate' | 'factor-level' | 'interaction';
  /** Table columns it is made from, outer first (empty for the intercept). */
  sources: string[];
  /**
   * The grouping factor entered as fixed whose level this column indicates (alone or in a product),
   * if any. These columns claim estimability right after the intercept (see fit/aliasing.ts).
   */
  fixedGroup?: string;
}

/** One random-effects term: a grouping factor with an intercept and optional slopes. */
export interface RandomTerm {
  /** Factor name as in the model description (e.g. "plot"). */
  factor: string;
  /** Level labels; nested factors use "outer/inner" labels. */
  levels: string[];
  /** Level index of each observation, 0..levels.length-1. */
  index: Int32Array;
  /** Names of the k columns of this term: "intercept" then slope column names. */
  terms: string[];
  /**
   * Values of the k columns, observation-major: values[i*k + j] is column j for row i.
   * Column 0 is 1 for a random intercept.
   */
  values: Float64Array;
  /** Whether the k effects are correlated (full lower-triangular factor) or independent (diagonal). */
  correlated: boolean;
}

export interface DesignMatrices {
  /** Number of observations used. */
  n: number;
  /** Number of fixed-effect columns (including aliased ones). */
  p: number;
  /** Fixed-effect design, row-major n × p. */
  X: Float64Array;
  /** Coefficient names: "intercept", "x", "habitat=wet", "x:habitat=wet", "year=2021". */
  fixedNames: string[];
  /** Role of each column of X, same order as `fixedNames`. */
  roles: ColumnRole[];
  /** Response. */
  y: Float64Array;
  /** Random-effects terms, empty for ordinary least squares. */
  random: RandomTerm[];
  /** Levels per grouping factor (random and fixed), for reporting. */
  levelCounts: Record<string, number>;
  /** Rows dropped for missing values (0-based row numbers of the input). */
  droppedRows: number[];
  /** Input row number of each used observation. */
  rowIds: Int32Array;
  /** Warnings raised while building (e.g. rows dropped). */
  warnings: string[];
  /** Binomial models: trials per observation. */
  trials?: Float64Array;
  /** Count and detection models: offset added to the linear predictor, per observation. */
  offset?: Float64Array;
  /**
   * Changes whenever X, n, or the random terms' index or values were refilled in place (a design
   * plan reuses one design object across a study's replicates, see ./design-plan). Anything kept per
   * design object that depends on more than y must be rebuilt when it differs. Absent: never refilled.
   */
  revision?: number;
}
