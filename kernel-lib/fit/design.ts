/**
 * The numeric form of a model applied to a table: what the engine fits.
 * Built once per data shape by data/buildDesign; in a simulation study only `y` changes.
 */

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
}
