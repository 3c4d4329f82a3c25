import { readJsonFile } from './read-json-file';
import { parseArgs } from 'node:util';
import { readCsvFile } from '../data/csv';
import { fitModel } from '../fit/fit-model';
import { parseModel } from '../model/parse';
import { QuadratInputError } from '../model/errors';
import { fitToJson, formatFit } from './format-fit';

export const FIT_USAGE = 'quadrat fit --data <file.csv> --model <model.json> [--json] [--ci <method>] [--level <0..1>]';

/** `quadrat fit`: fit one model description to a CSV file. */
export function fitCommand(argv: string[], print: (s: string) => void): number {
  const { values } = parseArgs({
    args: argv,
    options: {
      data: { type: 'string' },
      model: { type: 'string' },
      json: { type: 'boolean', default: false },
      ci: { type: 'string' },
      level: { type: 'string' },
    },
    strict: true,
  });
  if (!values.data) throw new QuadratInputError(`--data is required: ${FIT_USAGE}`, { field: '--data' });
  if (!values.model) throw new QuadratInputError(`--model is required: ${FIT_USAGE}`, { field: '--model' });
  const data = readCsvFile(values.data);
  const parsed = readJsonFile(values.model, '--model');
  if (parsed === null || typeof parsed !== 'object' || Array.isArray(parsed)) {
    throw new QuadratInputError(`--model: "${values.model}" must hold one JSON object (a model description)`, { field: '--model' });
  }
  let raw = parsed as Record<string, unknown>;
  if (values.ci) raw = { ...raw, interval: values.ci };
  if (values.level !== undefined) {
    const level = Number(values.level);
    if (!(level > 0 && level < 1)) throw new QuadratInputError(`--level: expected a number between 0 and 1, got "${values.level}"`, { field: '--level' });
    raw = { ...raw, level };
  }
  const model = parseModel(raw);
  const fit = fitModel(data, model);
  print(values.json ? JSON.stringify(fitToJson(fit, model.level), null, 2) : formatFit(fit, model.level, `Fit of ${values.model} to ${values.data}`));
  return fit.failure ? 1 : 0;
}
