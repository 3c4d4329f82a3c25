import { join } from 'node:path';
import { readFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { readCsvFile } from '../data/csv';
import { fitModel } from '../fit/fit-model';
import { formatComparison } from './compare-fits';

/** Project root: dist/cli/ or kernel-lib/cli/ are two levels below it. */
export const PROJECT_ROOT = join(__dirname, '..', '..');

/** `quadrat demo`: fit the invented demo survey with year as random and as fixed, side by side. */
export function demoCommand(argv: string[], print: (s: string) => void): number {
  parseArgs({ args: argv, options: { out: { type: 'string' } }, strict: true });
  const dataFile = join(PROJECT_ROOT, 'data', 'demo-survey.csv');
  const data = readCsvFile(dataFile);
  const models = [
    { name: 'year random', file: join(PROJECT_ROOT, 'data', 'demo-model.json') },
    { name: 'year fixed', file: join(PROJECT_ROOT, 'data', 'demo-model-year-fixed.json') },
  ];
  const fits = models.map((m) => ({ name: m.name, fit: fitModel(data, JSON.parse(readFileSync(m.file, 'utf8'))) }));
  print(`Demo: the invented survey in data/demo-survey.csv fitted two ways\n`);
  print(formatComparison(fits));
  return 0;
}
