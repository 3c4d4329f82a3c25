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

module.exports = { countCases };

if (require.main === module) {
  const rows = countCases();
  if (process.argv.includes('--json')) console.log(JSON.stringify(rows, null, 1));
  else for (const r of rows) console.log(`${r.case}: ${r.fitsPerSecond.toFixed(0)} fits/s; ${r.reference} ${r.referenceFitsPerSecond.toFixed(0)} fits/s; ratio ${r.ratio.toFixed(2)}`);
}
