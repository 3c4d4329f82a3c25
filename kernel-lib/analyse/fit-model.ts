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
import { checkFitOptions } from '../fit/check-fit-options';
import { checkInterval } from '../model/interval-rule';

export type SurveyData = Columns | readonly object[] | TableLike;

/** Fit one model description to a survey table (arquero table, array of records, or columns). */
export function fitModel(data: SurveyData, model: ModelSpec | ResolvedModel | string, options: FitOptions = {}): FitResult {
  return fitResolvedModel(data, parseModel(model), options);
}

/** Fit a model already parsed by parseModel (so a caller that needs the parsed model parses once). */
export function fitResolvedModel(data: SurveyData, model: ResolvedModel, options: FitOptions = {}): FitResult {
  checkFitOptions(options);
  const estimation = options.estimation ?? model.estimation;
  // an option that overrides the model's method or estimation is named as the culprit
  const interval = checkInterval(
    options.interval ?? model.interval, { family: model.family, estimation, random: model.groups.some((g) => g.as === 'random') },
    options.interval === undefined ? 'model.interval' : 'options.interval', options.estimation === undefined ? 'model.estimation' : 'options.estimation',
  );
  const design = buildDesign(toColumns(data as Columns), model);
  return fitDesign(design, {
    family: model.family, integration: model.integration, nodes: model.nodes,
    estimation: model.estimation, level: model.level, interval, ...options,
  });
}
