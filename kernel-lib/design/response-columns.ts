/**
 * The design fields that shape a count or detection response beyond the family: binomial trials
 * (one number, or a range drawn per observation into its own column) and an offset covariate
 * (added to the linear predictor with coefficient 1, as a model's `offset`). Checked here so
 * every error names its field; the draws themselves are in ./simulate.
 */
import { describeValue, listNames } from '../model/errors';
import type { ResolvedModel } from '../model/types';
import { expectInteger, expectObject, fail, isPlainObject, rejectUnknownKeys } from '../model/option-checks';
import { expectName } from './checks';
import type { ColumnCatalog } from './columns';
import type { SurveyDesign } from './types';

const DEFAULT_TRIALS_COLUMN = 'trials';

/** `trials` of a design: a whole number ≥ 1, or { min, max, column } with 1 ≤ min ≤ max. */
export function parseDesignTrials(value: unknown, path: string, family: string): Pick<SurveyDesign, 'trials' | 'trialsRange'> {
  if (value === undefined) return { trials: 1 };
  if (family !== 'binomial') fail(`${path}: only used with "family": "binomial"`, path);
  if (!isPlainObject(value)) {
    if (typeof value !== 'number') fail(`${path}: expected a whole number ≥ 1 or a range { "min": 2, "max": 6 }, got ${describeValue(value)}`, path);
    return { trials: expectInteger(value, path, 1) };
  }
  const obj = expectObject(value, path);
  rejectUnknownKeys(obj, ['min', 'max', 'column'], path);
  const min = expectInteger(obj.min, `${path}.min`, 1);
  const max = expectInteger(obj.max, `${path}.max`, 1);
  if (max < min) fail(`${path}.max: expected at least min (${min}), got ${max}`, `${path}.max`);
  const column = obj.column === undefined ? DEFAULT_TRIALS_COLUMN : expectName(obj.column, `${path}.column`);
  return { trials: max, trialsRange: { min, max, column } };
}

/** The trials column joins the numeric columns; its name must be new. */
export function addTrialsColumn(catalog: ColumnCatalog, design: Pick<SurveyDesign, 'trialsRange'>, path: string): void {
  const range = design.trialsRange;
  if (!range) return;
  const field = `${path}.column`;
  if (range.column === catalog.response || catalog.numeric.includes(range.column) || catalog.text.has(range.column)) {
    fail(`${field}: "${range.column}" is already a column of the design (the response, a factor or a covariate); name the trials column differently`, field);
  }
  catalog.numeric.push(range.column);
}

/** `offset` of a design: a numeric covariate, for a count or detection family only. */
export function parseDesignOffset(value: unknown, path: string, family: string, catalog: ColumnCatalog, trialsColumn?: string): string | undefined {
  if (value === undefined) return undefined;
  if (family === 'gaussian') fail(`${path}: only used with a count or detection family ("poisson", "binomial", "negative-binomial")`, path);
  const name = expectName(value, path);
  const numeric = catalog.numeric.filter((c) => c !== trialsColumn);
  if (!numeric.includes(name)) fail(`${path}: "${name}" is not a numeric covariate of the design; numeric covariates: ${listNames(numeric)}`, path);
  return name;
}

/**
 * A variant's trials and offset against the design's: a binomial variant of binomial data uses the
 * design's trials (the number, or the name of the drawn column); an offset names a numeric column.
 */
export function checkVariantResponseColumns(model: ResolvedModel, design: Pick<SurveyDesign, 'family' | 'trials' | 'trialsRange'>, catalog: ColumnCatalog, path: string): void {
  if (model.family === 'binomial' && design.family === 'binomial') {
    const expected = design.trialsRange ? design.trialsRange.column : design.trials;
    if (model.trials !== expected) {
      const what = design.trialsRange ? `draws trials per observation into column "${expected}"` : `draws ${expected} trial(s) per observation`;
      fail(`${path}.trials: the design ${what}; give "trials": ${JSON.stringify(expected)}`, `${path}.trials`);
    }
  }
  if (model.offset !== undefined && !catalog.numeric.includes(model.offset)) {
    fail(`${path}.offset: unknown numeric column "${model.offset}"; numeric columns: ${listNames(catalog.numeric)}`, `${path}.offset`);
  }
}
