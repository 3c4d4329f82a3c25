'use strict';
// Runs one study in a fresh process and prints its timings as JSON (used by bench/run.js so that
// every worker count starts equally cold), with its peak resident memory. Usage: node bench/study-run-child.js <design.json> <replicates> <workers>
const { mkdtempSync, readFileSync } = require('node:fs');
const { tmpdir } = require('node:os');
const { join } = require('node:path');
const { runStudy } = require('../dist/study/run-study');

const [designFile, replicates, workers] = process.argv.slice(2);
const design = JSON.parse(readFileSync(designFile, 'utf8'));
const out = mkdtempSync(join(tmpdir(), 'quadrat-bench-study-'));
runStudy({ ...design, replicates: Number(replicates) }, { out, workers: Number(workers) }).then((r) => {
  // peak resident memory of the whole process (main thread and workers), in MB
  const peakRssMB = Math.round(process.resourceUsage().maxRSS / 1024);
  process.stdout.write(JSON.stringify({ ...r.timings, peakRssMB, complete: r.complete }) + '\n');
});
