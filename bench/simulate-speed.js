// Time to simulate one data set of the contract example (144 rows before 10% missing) with
// kernel-lib/design (run `npm run build` first). Usage: node bench/simulate-speed.js [replicates]
'use strict';
const { parseDesign } = require('../dist/design/parse');
const { simulateColumns, simulateInto, createWorkspace, simulationPlan } = require('../dist/design/simulate');
const { createStream } = require('../dist/random/stream');

const replicates = Number(process.argv[2] || 100000);
// Invented survey: 6 sites × 3 years, 4 plots per site, 2 observations per cell.
const design = parseDesign({
  seed: 42,
  replicates: 1,
  factors: [{ name: 'site', levels: 6 }, { name: 'year', levels: 3 }, { name: 'plot', levels: 4, within: 'site' }],
  perCell: 2,
  missing: 0.1,
  covariates: [
    { name: 'rain', varies: 'observation', normal: { mean: 0, sd: 1 } },
    { name: 'habitat', varies: 'site', categories: { dry: 0.5, wet: 0.5 } },
  ],
  truth: { fixed: { intercept: 10, rain: 0.5, 'habitat=wet': 1 }, sd: { site: 1, year: 0.5, residual: 2 } },
  variants: [{ name: 'v', model: { response: 'y', fixed: ['rain', 'habitat'], groups: [{ factor: 'site', as: 'random' }] } }],
});

function time(label, run) {
  const stream = createStream(1, label);
  for (let i = 0; i < replicates / 5; i++) run(stream); // warm up the optimiser
  const t0 = process.hrtime.bigint();
  let rows = 0;
  for (let i = 0; i < replicates; i++) rows += run(stream).n;
  const us = Number(process.hrtime.bigint() - t0) / replicates / 1000;
  console.log(`${label.padEnd(28)} ${us.toFixed(2)} µs/data set   (${(rows / replicates).toFixed(1)} rows kept on average)`);
}

time('simulateColumns (fresh)', (s) => simulateColumns(design, s));
const ws = createWorkspace(simulationPlan(design));
time('simulateInto (workspace)', (s) => simulateInto(ws, s));
