import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { readJsonFile } from './read-json-file';
import { readStudyFolder, studyReportHtml } from '../display/study-report';
import { parseArgs } from 'node:util';
import { QuadratInputError } from '../model/errors';
import { parseWholeNumber } from '../model/option-checks';
import { parseShard } from '../study/batch-plan';
import type { MetricRow } from '../study/metrics';
import { failureWarnings } from '../study/failure-warnings';
import { otherScaleNotes } from '../study/variant-scales';
import { mergeShards } from '../study/merge-shards';
import { runStudy } from '../study/run-study';
import { readStudy, readingText } from '../study/reading';
import { readManifest } from '../study/study-folder';
import { metricsJsonPath, reportPath } from '../study/folder-layout';
import { formatMetricsTable } from './metrics-table';
import { progressBar } from './progress-bar';
import { planCommand } from './plan-command';
import { COMMAND_HELP, SUBCOMMANDS } from './help';

const STUDY_USAGE = SUBCOMMANDS.study.map((s) => `quadrat ${COMMAND_HELP[`study ${s}`].usage}`).join('\n  ');

function intOption(value: string | undefined, name: string, min: number): number | undefined {
  return value === undefined ? undefined : parseWholeNumber(value, name, min);
}

/** Run a study with a progress bar; Ctrl-C stops after saving finished batches. */
export async function runStudyWithProgress(design: unknown, options: { out: string; replicates?: number; workers?: number; shard?: string }, print: (s: string) => void) {
  const controller = new AbortController();
  const onSigint = () => {
    controller.abort();
    process.stderr.write('\ninterrupting: finished batches are saved; run the same command again to resume\n');
  };
  process.once('SIGINT', onSigint);
  const bar = progressBar('study');
  try {
    const result = await runStudy(design, {
      out: options.out, replicates: options.replicates, workers: options.workers,
      shard: options.shard ? parseShard(options.shard) : undefined, onProgress: (p) => bar.update(p), signal: controller.signal,
    });
    bar.end();
    for (const w of result.warnings) print(`warning: ${w}`);
    return result;
  } finally {
    process.removeListener('SIGINT', onSigint);
  }
}

export async function studyCommand(argv: string[], print: (s: string) => void): Promise<number> {
  const [sub, ...rest] = argv;
  if (sub === 'run') {
    const { values, positionals } = parseArgs({
      args: rest, allowPositionals: true, strict: true,
      options: { out: { type: 'string' }, replicates: { type: 'string' }, workers: { type: 'string' }, shard: { type: 'string' } },
    });
    if (positionals.length !== 1) throw new QuadratInputError(`study run: expected one design file; usage: ${STUDY_USAGE}`, { field: 'design' });
    if (!values.out) throw new QuadratInputError('study run: --out <folder> is required', { field: '--out' });
    const design = readJsonFile(positionals[0], 'design');
    const result = await runStudyWithProgress(design, {
      out: values.out, replicates: intOption(values.replicates, '--replicates', 1), workers: intOption(values.workers, '--workers', 1), shard: values.shard,
    }, print);
    if (result.interrupted) {
      print(`interrupted after ${result.batchesRun} batches; results so far are in ${result.folder}`);
      return 130;
    }
    print(`done in ${result.seconds.toFixed(1)} s: ${result.batchesRun} batches run, ${result.batchesSkipped} already on disk, in ${result.folder}`);
    if (result.metrics) {
      for (const n of otherScaleNotes(result.metrics)) print(`note: ${n}`);
      print(formatMetricsTable(result.metrics));
    }
    else if (values.shard) print(`shard ${values.shard} complete; combine shards with: quadrat study merge <folders>... --out <folder>`);
    return 0;
  }
  if (sub === 'summary') {
    const { values, positionals } = parseArgs({ args: rest, allowPositionals: true, strict: true, options: { json: { type: 'boolean', default: false } } });
    if (positionals.length !== 1) throw new QuadratInputError('study summary: expected one study folder', { field: 'folder' });
    const path = metricsJsonPath(positionals[0]);
    if (!existsSync(path)) throw new QuadratInputError(`study summary: no metrics in "${positionals[0]}" (the study is not complete; run or merge it first)`, { field: 'folder' });
    const metrics = JSON.parse(readFileSync(path, 'utf8')) as MetricRow[];
    if (values.json) {
      print(JSON.stringify(metrics.map((m) => ({ ...m, value: Number.isFinite(m.value) ? m.value : null, mcse: Number.isFinite(m.mcse) ? m.mcse : null })), null, 1));
    } else {
      for (const w of failureWarnings(metrics)) print(`warning: ${w}`);
      for (const n of otherScaleNotes(metrics)) print(`note: ${n}`);
      // the answer first, then the table it comes from
      print(readingText(readStudy(metrics, readManifest(positionals[0]).scenarios)));
      print('');
      print(formatMetricsTable(metrics));
    }
    return 0;
  }
  if (sub === 'plan') return planCommand(rest, print);
  if (sub === 'merge') {
    const { values, positionals } = parseArgs({ args: rest, allowPositionals: true, strict: true, options: { out: { type: 'string' } } });
    if (!values.out) throw new QuadratInputError('study merge: --out <folder> is required', { field: '--out' });
    const { batches, metrics } = mergeShards(positionals, values.out);
    print(`merged ${batches} batches from ${positionals.length} folders into ${values.out}`);
    for (const w of failureWarnings(metrics)) print(`warning: ${w}`);
    print(formatMetricsTable(metrics));
    return 0;
  }
  if (sub === 'report') {
    const { values, positionals } = parseArgs({ args: rest, allowPositionals: true, strict: true, options: { out: { type: 'string' }, title: { type: 'string' } } });
    if (positionals.length !== 1) throw new QuadratInputError('study report: expected one study folder', { field: 'folder' });
    if (!existsSync(metricsJsonPath(positionals[0]))) throw new QuadratInputError(`study report: no metrics in "${positionals[0]}" (the study is not complete)`, { field: 'folder' });
    const file = values.out ?? reportPath(positionals[0]);
    writeFileSync(file, await studyReportHtml(readStudyFolder(positionals[0]), values.title ?? 'Simulation study'));
    print(`report written to ${file}`);
    return 0;
  }
  throw new QuadratInputError(`study: expected "run", "summary", "merge", "report" or "plan"; usage:\n  ${STUDY_USAGE}`, { field: 'study' });
}
