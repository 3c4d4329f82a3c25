import type { ModelSpec, ResolvedModel } from '../model/types';
import type { DesignMatrices } from './design';
import type { FitResult } from './result';
import { parseModel } from '../model/parse';
import { buildDesign } from '../data/build-design';
import { toColumns, type Columns, type TableLike } from '../data/columns';
import { fitDesign, type FitOptions } from './fit-design';
import { checkFitOptions, checkInterval } from './check-fit-options';
import { QuadratInputError } from '../model/errors';
import { involvesLevelOf } from '../model/terms';

export type SurveyData = Columns | readonly object[] | TableLike;

/**
 * Order in which X columns claim estimability: the intercept, then the dummies of grouping
 * factors entered as fixed, then everything else. So with site fixed, a site-level covariate is
 * the column reported as not estimable, and the site effects stay.
 */
export function aliasPriority(design: DesignMatrices, model: ResolvedModel): number[] {
  const fixedFactors = model.groups.filter((g) => g.as === 'fixed').map((g) => g.factor);
  const isGroupColumn = (name: string) => fixedFactors.some((f) => involvesLevelOf(name, f));
  const first: number[] = [];
  const group: number[] = [];
  const rest: number[] = [];
  design.fixedNames.forEach((name, j) => {
    if (j === 0 && name === 'intercept') first.push(j);
    else if (isGroupColumn(name)) group.push(j);
    else rest.push(j);
  });
  return [...first, ...group, ...rest];
}

/** Fit one model description to a survey table (arquero table, array of records, or columns). */
export function fitModel(data: SurveyData, model: ModelSpec | ResolvedModel | string, options: FitOptions = {}): FitResult {
  const resolved = parseModel(model);
  checkFitOptions(options);
  const interval = checkInterval(options.interval ?? resolved.interval, options.interval === undefined ? 'model.interval' : 'options.interval');
  const estimation = options.estimation ?? resolved.estimation;
  if (interval === 'kenward-roger' && estimation === 'ML' && resolved.groups.some((g) => g.as === 'random')) {
    throw new QuadratInputError('model.interval: "kenward-roger" is defined for REML fits only, but model.estimation is "ML"; use estimation "REML" or interval "satterthwaite"', { field: 'model.interval' });
  }
  const design = buildDesign(toColumns(data as Columns), resolved);
  return fitDesign(design, {
    estimation: resolved.estimation,
    level: resolved.level,
    interval,
    aliasPriority: aliasPriority(design, resolved),
    ...options,
  });
}

export { checkInterval } from './check-fit-options';
