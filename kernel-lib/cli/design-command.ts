import { writeFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { readCsvFile } from '../data/csv';
import { designFromSurvey } from '../design/from-survey';
import { QuadratInputError } from '../model/errors';
import { parseModel } from '../model/parse';
import { parseWholeNumber } from '../model/option-checks';
import { csvOptions } from './fit-command';
import { COMMAND_HELP } from './help';
import { readJsonFile } from './read-json-file';

const USAGE = `quadrat ${COMMAND_HELP['design from-survey'].usage}`;

/** `quadrat design from-survey`: a survey design JSON derived from pilot data and a model. */
export function designCommand(argv: string[], print: (s: string) => void): number {
  const [sub, ...rest] = argv;
  if (sub !== 'from-survey') throw new QuadratInputError(`design: expected "from-survey"; usage: ${USAGE}`, { field: 'design' });
  const { values, positionals } = parseArgs({
    args: rest, allowPositionals: true, strict: true,
    options: {
      model: { type: 'string' }, out: { type: 'string' }, seed: { type: 'string' }, replicates: { type: 'string' },
      delimiter: { type: 'string' }, decimal: { type: 'string' }, missing: { type: 'string', multiple: true },
    },
  });
  if (positionals.length !== 1) throw new QuadratInputError(`design from-survey: expected one survey CSV file; usage: ${USAGE}`, { field: 'survey' });
  if (!values.model) throw new QuadratInputError(`design from-survey: --model <model.json> is required; usage: ${USAGE}`, { field: '--model' });
  const replicates = values.replicates === undefined ? undefined : parseWholeNumber(values.replicates, '--replicates', 1);
  const seed = values.seed === undefined ? undefined : /^-?\d+$/.test(values.seed) ? Number(values.seed) : values.seed;
  const data = readCsvFile(positionals[0], csvOptions(values));
  const model = parseModel(readJsonFile(values.model, '--model'));
  const derived = designFromSurvey(data, model, { seed, replicates });
  const json = `${JSON.stringify(derived.design, null, 2)}\n`;
  const notes = derived.notes.map((n) => `note: ${n}`);
  if (values.out) {
    writeFileSync(values.out, json);
    print(`design written to ${values.out} (from ${positionals[0]}, ${derived.fit.observations} rows used)`);
    for (const n of notes) print(n);
  } else {
    print(json);
    for (const n of notes) process.stderr.write(`${n}\n`);
  }
  return 0;
}
