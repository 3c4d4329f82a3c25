import { mkdirSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { parseArgs } from 'node:util';
import { readFileSync } from 'node:fs';
import { studyReportHtml } from '../display/study-report';
import { parseWholeNumber } from '../model/option-checks';
import { readManifest } from '../study/study-folder';
import { metricsCsvPath, reportPath } from '../study/folder-layout';
import { formatMetricsTable } from './metrics-table';
import { readStudy, readingText } from '../study/reading';
import { runStudyWithProgress } from './study-command';

/** Project root: dist/cli/ or kernel-lib/cli/ are two levels below it. */
const PROJECT_ROOT = join(__dirname, '..', '..');

/**
 * `quadrat demo`: the bundled study of the invented Larkspur Fen survey (year random vs year
 * fixed with 3 to 8 survey years): metrics table on the terminal, HTML summary in a folder.
 */
export async function demoCommand(argv: string[], print: (s: string) => void): Promise<number> {
  const { values } = parseArgs({ args: argv, options: { out: { type: 'string' }, workers: { type: 'string' } }, strict: true });
  const out = values.out ?? join(PROJECT_ROOT, 'out', 'demo-study');
  mkdirSync(out, { recursive: true });
  const design = JSON.parse(readFileSync(join(PROJECT_ROOT, 'data', 'demo-study.json'), 'utf8'));
  print('Demo study of an invented survey (data/demo-study.json): tussock-sedge height at the fictional Larkspur Fen,');
  print('6 sites × 3 plots, 2 visits a year; is "year" better random or fixed with 3, 4, 6 or 8 survey years?\n');
  const workers = values.workers === undefined ? undefined : parseWholeNumber(values.workers, '--workers', 1);
  const result = await runStudyWithProgress(design, { out, workers }, print);
  if (result.interrupted || !result.metrics) {
    print(`interrupted; run the same command again to resume (results so far in ${out})`);
    return 130;
  }
  print(`\n${result.batchesRun ? `simulated and fitted in ${result.seconds.toFixed(1)} s` : 'results already on disk'}\n`);
  // the rows are already in memory: no need to read replicates.csv back
  const results = { manifest: readManifest(out), metrics: result.metrics, replicates: result.replicates! };
  // the answer first: year random or fixed, by the reading's stated rules
  print(readingText(readStudy(result.metrics, results.manifest.scenarios)));
  print('');
  // every parameter the design gives a truth for; the year=… coefficients of "year fixed" are in metrics.csv
  const truth = design.truth as { fixed?: Record<string, number>; sd?: Record<string, number> };
  const parameters = new Set([...Object.keys(truth.fixed ?? {}), ...Object.keys(truth.sd ?? {}).map((f) => `sd(${f})`)]);
  const key = result.metrics.filter((m) => parameters.has(m.parameter));
  print(formatMetricsTable(key, ['coverage', 'bias', 'rmse', 'width', 'power', 'sdMean', 'sdMedian']));
  print('Each cell: value (Monte Carlo SE), rounded to the digits the Monte Carlo SE supports; truth: the value the data were drawn from.');
  const report = reportPath(out);
  writeFileSync(report, await studyReportHtml(results, 'Demo study: year random or fixed? (invented survey)'));
  print(`\nAll metrics: ${relative(process.cwd(), metricsCsvPath(out)) || out}; per-replicate results: replicates.csv`);
  print(`HTML summary with charts: ${relative(process.cwd(), report)}`);
  print('Results hold only for the simulated assumptions; defer to a qualified statistician and local survey protocols.');
  return 0;
}
