import { writeFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { planCurveSpecs, planReportHtml } from '../display/plan-report';
import { QuadratInputError } from '../model/errors';
import { parseWholeNumber } from '../model/option-checks';
import { runPlan } from '../study/plan-run';
import { planCaseFolder, planCurvePath, reportPath } from '../study/folder-layout';
import { planFromPilot } from '../study/plan-pilot';
import { readCsvFile } from '../data/csv';
import type { ModelSpec } from '../model/types';
import { csvOptions } from './fit-command';
import { COMMAND_HELP } from './help';
import { readJsonFile } from './read-json-file';

const PLAN_USAGE = `quadrat ${COMMAND_HELP['study plan'].usage}`;

/**
 * `quadrat study plan`: the smallest value of the design's plan.vary that meets the plan's goals.
 * Writes plan.json, one curve spec per goal (plan-curve-<k>.vl.json) and report.html; Ctrl-C stops
 * after the current look, and the same command resumes from the replicates on disk.
 */
export async function planCommand(argv: string[], print: (s: string) => void): Promise<number> {
  const { values, positionals } = parseArgs({
    args: argv, allowPositionals: true, strict: true,
    options: {
      out: { type: 'string' }, workers: { type: 'string' }, survey: { type: 'string' }, model: { type: 'string' }, 'sd-of': { type: 'string' },
      delimiter: { type: 'string' }, decimal: { type: 'string' }, missing: { type: 'string', multiple: true },
    },
  });
  if (positionals.length !== 1) throw new QuadratInputError(`study plan: expected one design file; usage: ${PLAN_USAGE}`, { field: 'design' });
  if (!values.out) throw new QuadratInputError('study plan: --out <folder> is required', { field: '--out' });
  const workers = values.workers === undefined ? undefined : parseWholeNumber(values.workers, '--workers', 1);
  const design = readJsonFile(positionals[0], 'design');
  if (values.survey !== undefined) return pilotPlan(design, values as PilotArgs, workers, print);
  const controller = new AbortController();
  const onSigint = () => {
    controller.abort();
    process.stderr.write('\ninterrupting after this look: replicates on disk are kept; run the same command again to resume\n');
  };
  process.once('SIGINT', onSigint);
  try {
    const result = await runPlan(design, { out: values.out, workers, signal: controller.signal, onProgress: (line) => print(`  ${line}`) });
    planCurveSpecs(result).forEach((spec, j) => writeFileSync(planCurvePath(values.out!, j + 1), JSON.stringify(spec, null, 1)));
    writeFileSync(reportPath(values.out), await planReportHtml(result));
    print('');
    print(result.sentence);
    print(`${result.replicatesRun} replicates simulated in ${result.seconds.toFixed(1)} s; plan.json and report.html in ${values.out}`);
    print('The answer holds only for the simulated assumptions; defer to a qualified statistician and local survey protocols.');
    return result.interrupted ? 130 : 0;
  } finally {
    process.removeListener('SIGINT', onSigint);
  }
}

interface PilotArgs { out: string; survey: string; model?: string; 'sd-of'?: string; delimiter?: string; decimal?: string; missing?: string[] }

/**
 * From a pilot survey: the design is derived from the pilot fit (only the plan block and the seed
 * of the JSON are used) and planned at both ends and the estimate of the pilot's interval for one SD.
 */
async function pilotPlan(json: unknown, args: PilotArgs, workers: number | undefined, print: (s: string) => void): Promise<number> {
  if (!args.model) throw new QuadratInputError('study plan: --survey needs --model <model.json> (the model fitted to the pilot)', { field: '--model' });
  if (!args['sd-of']) throw new QuadratInputError('study plan: --survey needs --sd-of <factor> (the random factor whose SD is uncertain)', { field: '--sd-of' });
  const block = json as { plan?: Record<string, unknown>; seed?: number | string };
  if (typeof block.plan !== 'object' || block.plan === null) throw new QuadratInputError('plan: the JSON file has no plan block', { field: 'plan' });
  const model = readJsonFile(args.model, 'model') as ModelSpec;
  const result = await planFromPilot(readCsvFile(args.survey, csvOptions(args)), model, block.plan, {
    out: args.out, sdOf: args['sd-of'], workers, seed: block.seed, onProgress: (line) => print(`  ${line}`),
  });
  for (const c of result.cases) writeFileSync(reportPath(planCaseFolder(args.out, c.case)), await planReportHtml(c.result, `Sample-size plan, SD of ${result.factor} at its ${c.case}`));
  print('');
  print(result.sentence);
  for (const note of result.notes) print(`note: ${note}`);
  print('The answers hold only for the simulated assumptions; defer to a qualified statistician and local survey protocols.');
  return 0;
}
