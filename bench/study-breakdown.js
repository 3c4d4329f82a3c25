'use strict';
/**
 * Where a study's time goes, measured in this thread on the benchmark's study: simulating a data set,
 * building the design and fitting it, for each variant, formatting and writing the replicate rows,
 * and computing the metrics. Each part is timed over the same replicates as the whole loop.
 */
const { writeFileSync, mkdtempSync, rmSync } = require('node:fs');
const { tmpdir } = require('node:os');
const { join } = require('node:path');
const { ReplicateRunner } = require('../dist/study/replicate-runner');
const { parseDesign } = require('../dist/design/parse');
const { replicateRowsToCsv } = require('../dist/study/replicate-csv');
const { summarise } = require('../dist/study/metrics');
const { buildDesign } = require('../dist/data/build-design');
const { fitDesign } = require('../dist/fit/fit-design');

const seconds = (t0) => Number(process.hrtime.bigint() - t0) / 1e9;

/** Microseconds per replicate for each part of the study loop over `replicates` replicates of scenario 0. */
function studyBreakdown(designJson, replicates) {
  const runner = new ReplicateRunner(parseDesign(designJson));
  const variants = runner.scenarios[0].design.variants;
  const fitOne = (variant, design) => {
    return fitDesign(design, {
      estimation: variant.model.estimation, level: variant.model.level, interval: variant.model.interval,
      modes: false, fitted: false,
    });
  };
  // warm up every part
  for (let r = 0; r < 200; r++) { const d = runner.simulate(0, r); for (const v of variants) fitOne(v, buildDesign(d.columns, v.model)); }
  summarise(runner.runBatch(0, 0, 200));
  const first = 1000;
  let t0 = process.hrtime.bigint();
  for (let r = first; r < first + replicates; r++) runner.simulate(0, r);
  const simulate = seconds(t0);
  const design = {};
  const fit = {};
  for (const v of variants) {
    let build = 0;
    let total = 0;
    for (let r = first; r < first + replicates; r++) {
      const d = runner.simulate(0, r);
      t0 = process.hrtime.bigint();
      const matrices = buildDesign(d.columns, v.model);
      build += seconds(t0);
      t0 = process.hrtime.bigint();
      fitOne(v, matrices);
      total += seconds(t0);
    }
    design[v.name] = build;
    fit[v.name] = total;
  }
  t0 = process.hrtime.bigint();
  const rows = [];
  for (let r = first; r < first + replicates; r += 25) rows.push(...runner.runBatch(0, r, Math.min(r + 25, first + replicates)));
  const whole = seconds(t0);
  const dir = mkdtempSync(join(tmpdir(), 'quadrat-bench-write-'));
  t0 = process.hrtime.bigint();
  writeFileSync(join(dir, 'replicates.csv'), replicateRowsToCsv(rows, true));
  const write = seconds(t0);
  rmSync(dir, { recursive: true, force: true });
  t0 = process.hrtime.bigint();
  summarise(rows);
  const metrics = seconds(t0);
  const perReplicate = (s) => Number(((1e6 * s) / replicates).toFixed(1));
  const fitTotal = [...Object.values(design), ...Object.values(fit)].reduce((a, b) => a + b, 0);
  const byVariant = (m) => Object.fromEntries(Object.entries(m).map(([k, s]) => [k, perReplicate(s)]));
  return {
    replicates,
    rowsPerReplicate: rows.length / replicates,
    microsecondsPerReplicate: {
      simulate: perReplicate(simulate),
      design: byVariant(design),
      fit: byVariant(fit),
      // tidy rows and the rest of the loop: the whole loop minus simulating, building and fitting
      rows: perReplicate(Math.max(0, whole - simulate - fitTotal)),
      write: perReplicate(write),
      metrics: perReplicate(metrics),
      wholeLoop: perReplicate(whole),
    },
  };
}

module.exports = { studyBreakdown };
