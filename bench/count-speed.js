'use strict';
/**
 * Benchmark section: count and detection mixed models. Poisson random intercept (n = 120, 12 groups,
 * offset log effort) and binomial random intercept (n = 80, 10 groups, 1-6 trials), the invented
 * reference data of data/reference/counts, fitted with the Laplace approximation and with 9-node
 * adaptive Gauss-Hermite quadrature, against statsmodels' plain GLM (no random effect) on the same
 * data in the same run. Usage: node bench/count-speed.js [--json] (after npm run build).
 */
const { join } = require('node:path');
const { execFileSync } = require('node:child_process');
const { readCsvFile } = require('../dist/data/csv');
const { parseModel } = require('../dist/model/parse');
const { buildDesign } = require('../dist/data/build-design');
const { fitDesign } = require('../dist/fit/fit-design');

const DIR = join(__dirname, '..', 'data', 'reference', 'counts');

/** The case's table and model (random intercept of g; log effort as offset, m as trials). */
function design(name, family) {
  const columns = readCsvFile(join(DIR, `${name}.csv`));
  if (columns.effort) columns.log_effort = columns.effort.map(Math.log);
  const model = parseModel({
    response: 'y', family, fixed: ['x'], groups: [{ factor: 'g', as: 'random' }],
    ...(columns.effort ? { offset: 'log_effort' } : {}), ...(columns.m ? { trials: 'm' } : {}),
  });
  return buildDesign(columns, model);
}

/** Calls of fn per second of wall time and per second of this process's CPU time (user + system). */
function fitsPerSecond(fn, seconds) {
  for (let i = 0; i < 20; i++) fn();
  let count = 0;
  const start = process.hrtime.bigint();
  const cpu0 = process.cpuUsage();
  let elapsed = 0;
  while (elapsed < seconds) {
    for (let i = 0; i < 10; i++) fn();
    count += 10;
    elapsed = Number(process.hrtime.bigint() - start) / 1e9;
  }
  const cpu = process.cpuUsage(cpu0);
  return { wall: count / elapsed, cpu: count / ((cpu.user + cpu.system) / 1e6) };
}

function statsmodelsGlm(name, family) {
  const out = execFileSync('/usr/bin/python3', [join(__dirname, 'statsmodels_glm_bench.py'), join(DIR, `${name}.csv`), family, '200'], { encoding: 'utf8' });
  return JSON.parse(out);
}

/**
 * Fits per second of fitDesign (estimate and summarise steps, Wald intervals, modes and fitted
 * values) and of statsmodels GLM.fit() on the same data, by wall time and by CPU time: on a shared
 * machine the CPU-time rate is the per-core figure, and the ratio compares like with like.
 */
function countCases(seconds = 2) {
  const rows = [];
  for (const [name, family] of [['poisson-groups', 'poisson'], ['binomial-groups', 'binomial']]) {
    const d = design(name, family);
    const reference = statsmodelsGlm(name, family);
    for (const integration of ['laplace', 'quadrature']) {
      const rate = fitsPerSecond(() => fitDesign(d, { family, integration, nodes: 9 }), seconds);
      rows.push({
        case: `${family} random intercept n=${d.n}, ${d.random[0].levels.length} groups, ${integration === 'laplace' ? 'Laplace' : '9-node quadrature'}`,
        fitsPerSecond: rate.wall, fitsPerCpuSecond: rate.cpu,
        referenceFitsPerSecond: reference.fitsPerSecond, referenceFitsPerCpuSecond: reference.fitsPerCpuSecond,
        reference: 'statsmodels GLM (no random effect)', ratio: rate.wall / reference.fitsPerSecond, cpuRatio: rate.cpu / reference.fitsPerCpuSecond,
      });
    }
  }
  return rows;
}

/** Replicates per second, in one thread without I/O, of a count study: 30 sites x 6 visits, Poisson mixed vs counts as normal. */
function countStudy(seconds = 3) {
  const { ReplicateRunner } = require('../dist/study/replicate-runner');
  const { resolveStudyDesign } = require('../dist/study/run-study');
  const site = { factor: 'site', as: 'random' };
  const { design } = resolveStudyDesign({
    seed: 5, replicates: 100000, factors: [{ name: 'site', levels: 30 }], perCell: 6,
    covariates: [{ name: 'x', varies: 'observation', normal: { mean: 0, sd: 1 } }], family: 'poisson',
    truth: { fixed: { intercept: 0.5, x: 0.3 }, sd: { site: 0.5 } },
    variants: [
      { name: 'poisson mixed', model: { response: 'y', family: 'poisson', fixed: ['x'], groups: [site] } },
      { name: 'counts as normal', model: { response: 'y', fixed: ['x'], groups: [site] } },
    ],
  });
  const runner = new ReplicateRunner(design);
  runner.runBatch(0, 0, 10);
  let r = 10;
  const start = process.hrtime.bigint();
  const cpu0 = process.cpuUsage();
  let elapsed = 0;
  while (elapsed < seconds) {
    runner.runBatch(0, r, r + 10);
    r += 10;
    elapsed = Number(process.hrtime.bigint() - start) / 1e9;
  }
  const cpu = process.cpuUsage(cpu0);
  return {
    case: 'count study: 30 sites x 6 visits, Poisson mixed (Laplace) + counts as normal',
    replicatesPerSecondInThread: (r - 10) / elapsed, replicatesPerCpuSecond: (r - 10) / ((cpu.user + cpu.system) / 1e6),
  };
}

/** Text lines of the count section. */
function countLines(rows, study) {
  const lines = rows.map((r) =>
    `${r.case}: ${r.fitsPerSecond.toFixed(0)} fits/s (${r.fitsPerCpuSecond.toFixed(0)} per CPU second); ${r.reference} ${r.referenceFitsPerSecond.toFixed(0)} ` +
    `(${r.referenceFitsPerCpuSecond.toFixed(0)} per CPU second); ratio ${r.ratio.toFixed(2)} (CPU ${r.cpuRatio.toFixed(2)})`);
  lines.push(`${study.case}: ${study.replicatesPerSecondInThread.toFixed(1)} replicates/s in one thread (${study.replicatesPerCpuSecond.toFixed(1)} per CPU second)`);
  return lines;
}

module.exports = { countCases, countStudy, countLines };

if (require.main === module) {
  const rows = countCases();
  const study = countStudy();
  if (process.argv.includes('--json')) console.log(JSON.stringify([...rows, study], null, 1));
  else {
    for (const line of countLines(rows, study)) console.log(line);
  }
}
