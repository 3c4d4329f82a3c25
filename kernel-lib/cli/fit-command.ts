import { readJsonFile } from './read-json-file';
import { parseArgs } from 'node:util';
import { checkCsvOptions, readCsvFile, type CsvOptions } from '../data/csv';
import { fitResolvedModel } from '../analyse/fit-model';
import { parseModel } from '../model/parse';
import { QuadratInputError } from '../model/errors';
import { checkLevel } from '../model/option-checks';
import { fitToJson, formatFit } from './format-fit';
import { COMMAND_HELP } from './help';

const FIT_USAGE = `quadrat ${COMMAND_HELP.fit.usage}`;

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
      delimiter: { type: 'string' },
      decimal: { type: 'string' },
      missing: { type: 'string', multiple: true },
    },
    strict: true,
  });
  if (!values.data) throw new QuadratInputError(`--data is required: ${FIT_USAGE}`, { field: '--data' });
  if (!values.model) throw new QuadratInputError(`--model is required: ${FIT_USAGE}`, { field: '--model' });
  const data = readCsvFile(values.data, csvOptions(values));
  const parsed = readJsonFile(values.model, '--model');
  if (parsed === null || typeof parsed !== 'object' || Array.isArray(parsed)) {
    throw new QuadratInputError(`--model: "${values.model}" must hold one JSON object (a model description)`, { field: '--model' });
  }
  let raw = parsed as Record<string, unknown>;
  if (values.ci) raw = { ...raw, interval: values.ci };
  if (values.level !== undefined) {
    raw = { ...raw, level: checkLevel(values.level.trim() === '' ? NaN : Number(values.level), '--level') };
  }
  const model = parseModel(raw);
  const fit = fitResolvedModel(data, model);
  print(values.json ? JSON.stringify(fitToJson(fit, model.level), null, 2) : formatFit(fit, model.level, `${model.response}: fit of ${values.model} to ${values.data}`, model));
  return fit.failure ? 1 : 0;
}

/**
 * CSV reading options from the command line: --delimiter (one character, or "tab"), --decimal,
 * and --missing (repeatable or comma-separated; replaces the default markers).
 */
export function csvOptions(values: { delimiter?: string; decimal?: string; missing?: string[] }): CsvOptions {
  const out: CsvOptions = {};
  if (values.delimiter !== undefined) out.delimiter = values.delimiter === 'tab' ? '\t' : values.delimiter;
  if (values.decimal !== undefined) out.decimal = values.decimal;
  if (values.missing !== undefined) out.missing = values.missing.flatMap((m) => m.split(','));
  try {
    checkCsvOptions(out);
  } catch (e) {
    const err = e as QuadratInputError;
    const field = `--${err.field ?? 'delimiter'}`;
    throw new QuadratInputError(err.message.replace(/^csv (delimiter|decimal|missing)/, field), { field });
  }
  return out;
}
