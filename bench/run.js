'use strict';
/**
 * Benchmark: Quadrat's engine against statsmodels MixedLM (REML) on the same generated data sets,
 * measured in one run. Usage: npm run bench [-- --json] [-- --quick]
 * Run after `npm run build` (npm install builds).
 */
const { mkdtempSync, writeFileSync } = require('node:fs');
const { tmpdir } = require('node:os');
const { join } = require('node:path');
const { execFileSync } = require('node:child_process');
const { engineCases, toCsv } = require('./engine-cases');
const { readCsvFile } = require('../dist/data/csv');
const { parseModel } = require('../dist/model/parse');
const { buildDesign } = require('../dist/data/build-design');
const { fitDesign } = require('../dist/fit/fit-design');

const args = process.argv.slice(2);
const asJson = args.includes('--json');
const quick = args.includes('--quick');
const PY = '/usr/bin/python3';

function timeQuadrat(design, minSeconds) {
  // warm up, then run until minSeconds have passed
  for (let i = 0; i < 50; i++) fitDesign(design);
  let count = 0;
  const start = process.hrtime.bigint();
  let elapsed = 0;
  while (elapsed < minSeconds) {
    for (let i = 0; i < 50; i++) fitDesign(design);
    count += 50;
    elapsed = Number(process.hrtime.bigint() - start) / 1e9;
  }
  return { fitsPerSecond: count / elapsed, fit: fitDesign(design) };
}

function timeStatsmodels(file, kind, repeats) {
  try {
    const out = execFileSync(PY, [join(__dirname, 'statsmodels_bench.py'), file, kind, String(repeats)], { encoding: 'utf8' });
    return JSON.parse(out);
  } catch (e) {
    return { error: String(e.message).split('\n')[0] };
  }
}

function main() {
  const dir = mkdtempSync(join(tmpdir(), 'quadrat-bench-'));
  const rows = [];
  for (const c of engineCases()) {
    const file = join(dir, `${c.kind}-${rows.length}.csv`);
    writeFileSync(file, toCsv(c.columns));
    const model = parseModel(c.model);
    const design = buildDesign(readCsvFile(file), model);
    const q = timeQuadrat(design, quick ? 0.3 : 1.5);
    const ref = timeStatsmodels(file, c.kind, quick ? 3 : 15);
    const refFps = ref.fitsPerSecond ?? NaN;
    // agreement of the fixed effects (statsmodels names: Intercept, x / rain)
    let maxDiff = NaN;
    if (ref.params) {
      maxDiff = 0;
      for (const r of q.fit.fixed) {
        const key = r.term === 'intercept' ? 'Intercept' : r.term;
        if (key in ref.params) maxDiff = Math.max(maxDiff, Math.abs(r.estimate - ref.params[key]) / r.se);
      }
    }
    rows.push({
      case: c.name,
      fitsPerSecond: Math.round(q.fitsPerSecond),
      microsecondsPerFit: Math.round(1e6 / q.fitsPerSecond),
      referenceFitsPerSecond: Number.isFinite(refFps) ? Number(refFps.toFixed(2)) : null,
      ratio: Number.isFinite(refFps) ? Math.round(q.fitsPerSecond / refFps) : null,
      maxFixedDifferenceInSE: Number.isFinite(maxDiff) ? Number(maxDiff.toExponential(2)) : null,
      referenceError: ref.error,
    });
  }
  if (asJson) {
    process.stdout.write(JSON.stringify(rows, null, 2) + '\n');
    return;
  }
  console.log('Engine benchmark: one REML fit per call, same data for Quadrat and statsmodels MixedLM (lbfgs), one core');
  console.log('case'.padEnd(44), 'Quadrat fits/s'.padStart(15), 'µs/fit'.padStart(8), 'statsmodels fits/s'.padStart(19), 'ratio'.padStart(7), 'max |Δβ|/SE'.padStart(12));
  for (const r of rows) {
    console.log(r.case.padEnd(44), String(r.fitsPerSecond).padStart(15), String(r.microsecondsPerFit).padStart(8),
      String(r.referenceFitsPerSecond ?? 'n/a').padStart(19), String(r.ratio ?? 'n/a').padStart(7), String(r.maxFixedDifferenceInSE ?? 'n/a').padStart(12));
    if (r.referenceError) console.log(`  (statsmodels not measured: ${r.referenceError})`);
  }
}

main();
