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
const { countCases, countStudy, countLines } = require('./count-speed');
const { readCsvFile } = require('../dist/data/csv');
const { parseModel } = require('../dist/model/parse');
const { buildDesign } = require('../dist/data/build-design');
const { fitDesign } = require('../dist/fit/fit-design');
const { studyBreakdown } = require('./study-breakdown');

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

/** Microseconds per call of fitDesign(design, options), over about `seconds`. */
function microsecondsPerFit(design, options, seconds) {
  let count = 0;
  const start = process.hrtime.bigint();
  let elapsed = 0;
  while (elapsed < seconds) {
    for (let i = 0; i < 20; i++) fitDesign(design, options);
    count += 20;
    elapsed = Number(process.hrtime.bigint() - start) / 1e9;
  }
  return (1e6 * elapsed) / count;
}

/**
 * Cost of the small-sample df for every coefficient relative to the (Wald) fit itself: fitDesign with
 * the method over fitDesign without it. Wald and the method are timed in alternating rounds and the
 * median ratio is reported, so background load affects both sides alike. Target for Satterthwaite: ≤ 3x.
 */
function timeInference(name, design, seconds) {
  const methods = ['satterthwaite', 'kenward-roger'];
  for (const interval of ['wald', ...methods]) for (let i = 0; i < 200; i++) fitDesign(design, { interval });
  const rounds = 7;
  const wald = [];
  const ratios = { satterthwaite: [], 'kenward-roger': [] };
  const times = { satterthwaite: [], 'kenward-roger': [] };
  for (let r = 0; r < rounds; r++) {
    const w = microsecondsPerFit(design, { interval: 'wald' }, seconds / rounds / 3);
    wald.push(w);
    for (const interval of methods) {
      const t = microsecondsPerFit(design, { interval }, seconds / rounds / 3);
      times[interval].push(t);
      ratios[interval].push(t / w);
    }
  }
  const median = (v) => v.slice().sort((a, b) => a - b)[Math.floor(v.length / 2)];
  return {
    case: name,
    waldMicroseconds: Math.round(median(wald)),
    satterthwaiteMicroseconds: Math.round(median(times.satterthwaite)),
    satterthwaiteFactor: Number(median(ratios.satterthwaite).toFixed(2)),
    kenwardRogerMicroseconds: Math.round(median(times['kenward-roger'])),
    kenwardRogerFactor: Number(median(ratios['kenward-roger']).toFixed(2)),
  };
}

function timeStatsmodels(file, kind, repeats) {
  try {
    const out = execFileSync(PY, [join(__dirname, 'statsmodels_bench.py'), file, kind, String(repeats)], { encoding: 'utf8' });
    return JSON.parse(out);
  } catch (e) {
    return { error: String(e.message).split('\n')[0] };
  }
}

/** Study benchmark: simulate and fit both ways, with 1 and 2 workers, and the demo's wall time. */
async function studyBench() {
  const { ReplicateRunner } = require('../dist/study/replicate-runner');
  const { parseDesign } = require('../dist/design/parse');
  const { replicateRowsToCsv } = require('../dist/study/replicate-csv');
  const design = JSON.parse(require('node:fs').readFileSync(join(__dirname, 'study-random-intercept.json'), 'utf8'));
  const replicates = quick ? 2000 : 20000;
  // in this thread, no I/O: simulate, fit as random, fit as fixed, tidy rows and CSV text
  const runner = new ReplicateRunner(parseDesign(design));
  for (let b = 0; b < 20; b++) replicateRowsToCsv(runner.runBatch(0, b * 25, b * 25 + 25));
  let t0 = process.hrtime.bigint();
  for (let b = 20; b < 20 + replicates / 25; b++) replicateRowsToCsv(runner.runBatch(0, b * 25, b * 25 + 25));
  const inThread = replicates / (Number(process.hrtime.bigint() - t0) / 1e9);
  // each worker count in a fresh process, so both start equally cold (JIT, module loading)
  const byWorkers = {};
  const finalise = {};
  const childReplicates = quick ? 6000 : 60000;
  for (const workers of [1, 2]) {
    const out = execFileSync(process.execPath, [join(__dirname, 'study-run-child.js'), join(__dirname, 'study-random-intercept.json'), String(childReplicates), String(workers)], { encoding: 'utf8' });
    const timings = JSON.parse(out.trim().split('\n').pop());
    // simulate-and-fit throughput (batches written to disk); assembling replicates.csv and the metrics is timed apart
    byWorkers[workers] = childReplicates / timings.runSeconds;
    finalise[workers] = timings.finaliseSeconds;
  }
  const breakdown = studyBreakdown(design, quick ? 500 : 4000);
  // memory: a study of a million replicate rows (a tenth with --quick), two workers, in a fresh process
  const memoryRows = quick ? 100000 : 1000000;
  const memoryReplicates = Math.ceil(memoryRows / breakdown.rowsPerReplicate);
  const memory = JSON.parse(execFileSync(process.execPath, [join(__dirname, 'study-run-child.js'), join(__dirname, 'study-random-intercept.json'), String(memoryReplicates), '2'], { encoding: 'utf8' })
    .trim().split('\n').pop());
  const demoOut = mkdtempSync(join(tmpdir(), 'quadrat-bench-demo-'));
  t0 = process.hrtime.bigint();
  execFileSync(process.execPath, [join(__dirname, '..', 'bin', 'quadrat.js'), 'demo', '--out', demoOut], { stdio: 'ignore' });
  const demoSeconds = Number(process.hrtime.bigint() - t0) / 1e9;
  // a plan over 4 to 60 sites (random intercept, 4 observations per site), 2 workers, from an empty folder
  const planOut = mkdtempSync(join(tmpdir(), 'quadrat-bench-plan-'));
  t0 = process.hrtime.bigint();
  execFileSync(process.execPath, [join(__dirname, '..', 'bin', 'quadrat.js'), 'study', 'plan', join(__dirname, 'plan-random-intercept.json'), '--out', planOut, '--workers', '2'], { stdio: 'ignore' });
  const planSeconds = Number(process.hrtime.bigint() - t0) / 1e9;
  const plan = JSON.parse(require('node:fs').readFileSync(join(planOut, 'plan.json'), 'utf8'));
  return {
    case: 'study: random intercept (8 sites x 6), simulate + fit random + fit fixed',
    planWallSeconds: Number(planSeconds.toFixed(2)),
    planAnswer: plan.smallest,
    planDecided: plan.decided,
    planReplicates: plan.evaluated.reduce((n, e) => n + e.replicates, 0),
    replicatesPerSecondInThread: Math.round(inThread),
    replicatesPerSecondOneWorker: Math.round(byWorkers[1]),
    replicatesPerSecondTwoWorkers: Math.round(byWorkers[2]),
    scaling: Number((byWorkers[2] / byWorkers[1]).toFixed(2)),
    finaliseSeconds: Number(finalise[2].toFixed(2)),
    replicates: childReplicates,
    demoWallSeconds: Number(demoSeconds.toFixed(2)),
    breakdown,
    memory: { replicateRows: Math.round(memoryReplicates * breakdown.rowsPerReplicate), peakRssMB: memory.peakRssMB, seconds: Number((memory.runSeconds + memory.finaliseSeconds).toFixed(1)) },
  };
}

async function main() {
  const dir = mkdtempSync(join(tmpdir(), 'quadrat-bench-'));
  const rows = [];
  const inference = [];
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
    inference.push(timeInference(c.name, design, quick ? 1 : 4));
  }
  const study = args.includes('--engine-only') ? null : await studyBench();
  const counts = [...countCases(quick ? 0.5 : 2), countStudy(quick ? 1 : 3)];
  if (asJson) {
    process.stdout.write(JSON.stringify([...rows, ...(study ? [study] : []), ...inference, ...counts], null, 2) + '\n');
    return;
  }
  console.log('Engine benchmark: one REML fit per call, same data for Quadrat and statsmodels MixedLM (lbfgs), one core');
  console.log('case'.padEnd(44), 'Quadrat fits/s'.padStart(15), 'µs/fit'.padStart(8), 'statsmodels fits/s'.padStart(19), 'ratio'.padStart(7), 'max |Δβ|/SE'.padStart(12));
  for (const r of rows) {
    console.log(r.case.padEnd(44), String(r.fitsPerSecond).padStart(15), String(r.microsecondsPerFit).padStart(8),
      String(r.referenceFitsPerSecond ?? 'n/a').padStart(19), String(r.ratio ?? 'n/a').padStart(7), String(r.maxFixedDifferenceInSE ?? 'n/a').padStart(12));
    if (r.referenceError) console.log(`  (statsmodels not measured: ${r.referenceError})`);
  }
  console.log('');
  console.log('Small-sample df for every coefficient: time of fitDesign with the method over the Wald fit (median of 7 alternating rounds; Satterthwaite target: at most 3x)');
  console.log('case'.padEnd(44), 'Wald µs'.padStart(9), 'Satterthwaite µs'.padStart(17), 'factor'.padStart(7), 'Kenward-Roger µs'.padStart(17), 'factor'.padStart(7));
  for (const r of inference) {
    console.log(r.case.padEnd(44), String(r.waldMicroseconds).padStart(9), String(r.satterthwaiteMicroseconds).padStart(17), `${r.satterthwaiteFactor}x`.padStart(7),
      String(r.kenwardRogerMicroseconds).padStart(17), `${r.kenwardRogerFactor}x`.padStart(7));
  }
  console.log('');
  console.log('Count and detection fits (same data for Quadrat mixed models and statsmodels GLM without random effect)');
  for (const line of countLines(counts.slice(0, -1), counts[counts.length - 1])) console.log(`  ${line}`);
  if (study) {
    console.log('');
    console.log(`Study benchmark (${study.case}):`);
    console.log(`  replicates per second: ${study.replicatesPerSecondInThread} in one thread without I/O, ${study.replicatesPerSecondOneWorker} with 1 worker, ${study.replicatesPerSecondTwoWorkers} with 2 workers (scaling ${study.scaling}x)`);
    console.log(`  then assembling replicates.csv and the metrics for ${study.replicates} replicates: ${study.finaliseSeconds} s`);
    const b = study.breakdown.microsecondsPerReplicate;
    const perVariant = (m) => Object.entries(m).map(([k, v]) => `${k} ${v}`).join(', ');
    console.log(`  where a replicate's time goes (µs, in one thread, ${study.breakdown.replicates} replicates, ${study.breakdown.rowsPerReplicate} rows each):`);
    console.log(`    simulate ${b.simulate}; build design: ${perVariant(b.design)}; fit: ${perVariant(b.fit)}; tidy rows ${b.rows}; write CSV ${b.write}; metrics ${b.metrics}; whole loop ${b.wholeLoop}`);
    console.log(`  memory: a study of ${study.memory.replicateRows} replicate rows (2 workers) peaked at ${study.memory.peakRssMB} MB resident (${study.memory.seconds} s)`);
    console.log(`  demo study (npm start: 4 scenarios x 1000 replicates x 2 variants) wall time: ${study.demoWallSeconds} s including start-up`);
    console.log(`  plan over 4 to 60 sites (random intercept, 4 per site, power of a site covariate >= 0.8, 2 workers): ${study.planWallSeconds} s wall time including start-up, ${study.planReplicates} replicates, answer ${study.planAnswer}${study.planDecided ? '' : ' (undecided)'}`);
  }
}

main().catch((e) => { console.error(e); process.exitCode = 1; });
