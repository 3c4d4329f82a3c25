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
const { estimateCountModel } = require('../dist/fit/estimate/count-model');

const DIR = join(__dirname, '..', 'data', 'reference', 'counts');

function design(name) {
  const rows = readCsvFile(join(DIR, `${name}.csv`));
  const n = rows.y.length;
  const labels = [...new Set(rows.g.map(String))].sort();
  const X = new Float64Array(2 * n);
  rows.x.forEach((x, i) => { X[2 * i] = 1; X[2 * i + 1] = x; });
  const d = {
    n, p: 2, X, fixedNames: ['intercept', 'x'], y: Float64Array.from(rows.y),
    random: [{ factor: 'g', levels: labels, index: Int32Array.from(rows.g.map((g) => labels.indexOf(String(g)))), terms: ['intercept'], values: new Float64Array(n).fill(1), correlated: true }],
    levelCounts: { g: labels.length }, droppedRows: [], rowIds: Int32Array.from({ length: n }, (_, i) => i), warnings: [],
  };
  const options = {
    offset: rows.effort ? Float64Array.from(rows.effort, Math.log) : undefined,
    trials: rows.m ? Float64Array.from(rows.m) : undefined,
  };
  return { d, options };
}

function fitsPerSecond(fn, seconds) {
  for (let i = 0; i < 20; i++) fn();
  let count = 0;
  const start = process.hrtime.bigint();
  let elapsed = 0;
  while (elapsed < seconds) {
    for (let i = 0; i < 10; i++) fn();
    count += 10;
    elapsed = Number(process.hrtime.bigint() - start) / 1e9;
  }
  return count / elapsed;
}

function statsmodelsGlm(name, family) {
  const out = execFileSync('/usr/bin/python3', [join(__dirname, 'statsmodels_glm_bench.py'), join(DIR, `${name}.csv`), family, '200'], { encoding: 'utf8' });
  return JSON.parse(out).fitsPerSecond;
}

function countCases(seconds = 2) {
  const rows = [];
  for (const [name, family] of [['poisson-groups', 'poisson'], ['binomial-groups', 'binomial']]) {
    const { d, options } = design(name);
    const reference = statsmodelsGlm(name, family);
    for (const integration of ['laplace', 'quadrature']) {
      const fps = fitsPerSecond(() => estimateCountModel(d, { family, ...options, integration, nodes: 9 }), seconds);
      rows.push({ case: `${family} random intercept n=${d.n}, ${d.random[0].levels.length} groups, ${integration === 'laplace' ? 'Laplace' : '9-node quadrature'}`, fitsPerSecond: fps, referenceFitsPerSecond: reference, reference: 'statsmodels GLM (no random effect)', ratio: fps / reference });
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
  let elapsed = 0;
  while (elapsed < seconds) {
    runner.runBatch(0, r, r + 10);
    r += 10;
    elapsed = Number(process.hrtime.bigint() - start) / 1e9;
  }
  return { case: 'count study: 30 sites x 6 visits, Poisson mixed (Laplace) + counts as normal', replicatesPerSecondInThread: (r - 10) / elapsed };
}

module.exports = { countCases, countStudy };

if (require.main === module) {
  const rows = countCases();
  const study = countStudy();
  if (process.argv.includes('--json')) console.log(JSON.stringify([...rows, study], null, 1));
  else {
    for (const r of rows) console.log(`${r.case}: ${r.fitsPerSecond.toFixed(0)} fits/s; ${r.reference} ${r.referenceFitsPerSecond.toFixed(0)} fits/s; ratio ${r.ratio.toFixed(2)}`);
    console.log(`${study.case}: ${study.replicatesPerSecondInThread.toFixed(1)} replicates/s in one thread`);
  }
}
