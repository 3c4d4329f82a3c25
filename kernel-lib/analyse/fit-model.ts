/**
 * From (table, model) to a fit: parse the model once, build the design matrices (data/), fit them
 * (fit/). The one place above both the data layer and the engine.
 */
import type { ModelSpec, ResolvedModel } from '../model/types';
import type { FitResult } from '../fit/result';
import { parseModel } from '../model/parse';
import { buildDesign } from '../data/build-design';
import { toColumns, type Columns, type TableLike } from '../data/columns';
import { fitDesign, type FitOptions } from '../fit/fit-design';
import { checkFitOptions, checkInterval } from '../fit/check-fit-options';
import { QuadratInputError } from '../model/errors';

export type SurveyData = Columns | readonly object[] | TableLike;

/** Fit one model description to a survey table (arquero table, array of records, or columns). */
export function fitModel(data: SurveyData, model: ModelSpec | ResolvedModel | string, options: FitOptions = {}): FitResult {
  return fitResolvedModel(data, parseModel(model), options);
}

/** Fit a model already parsed by parseModel (so a caller that needs the parsed model parses once). */
export function fitResolvedModel(data: SurveyData, model: ResolvedModel, options: FitOptions = {}): FitResult {
  checkFitOptions(options);
  const interval = checkInterval(options.interval ?? model.interval, options.interval === undefined ? 'model.interval' : 'options.interval');
  const estimation = options.estimation ?? model.estimation;
  if (interval === 'kenward-roger' && estimation === 'ML' && model.groups.some((g) => g.as === 'random')) {
    throw new QuadratInputError('model.interval: "kenward-roger" is defined for REML fits only, but model.estimation is "ML"; use estimation "REML" or interval "satterthwaite"', { field: 'model.interval' });
  }
  const design = buildDesign(toColumns(data as Columns), model);
  return fitDesign(design, {
    family: model.family, integration: model.integration, nodes: model.nodes,
    estimation: model.estimation, level: model.level, interval, ...options,
  });
}
