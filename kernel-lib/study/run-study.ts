import { randomUUID } from 'node:crypto';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { parseDesign } from '../design/parse';
import type { SurveyDesign } from '../design/types';
import { QuadratInputError } from '../model/errors';
import { batchesOfShard, planBatches, type Batch, type Shard } from './batch-plan';
import { batchFileName, batchPath } from './folder-layout';
import type { BatchReply, BatchTask } from './batch-worker';
import { failureWarnings } from './failure-warnings';
import type { MetricRow } from './metrics';
import { replicateRowsToCsv } from './replicate-csv';
import type { ReplicateRow } from './replicate-row';
import { ReplicateRunner } from './replicate-runner';
import { checkStudyOptions } from './check-study-options';
import { fingerprintOf, openStudyFolder, type StudyManifest } from './study-folder';
import { checkBatches, removeBatch, removeStaleTemporaries, writeBatch, type BatchStamp } from './batch-files';
import { ReplicateAssembly, type AssembledStudy } from './replicate-assembly';
import { acquireFolderLock, checkWritableFolder, lockProblem, releaseFolderLock } from './folder-lock';

export interface StudyProgress {
  /** Replicates finished in this run (batches already on disk not counted). */
  done: number;
  /** Replicates this run has to do. */
  total: number;
  /** Replicates already on disk when the run started. */
  resumed: number;
  elapsedSeconds: number;
  replicatesPerSecond: number;
  secondsLeft: number;
}

export interface RunStudyOptions {
  /** Output folder (created; an existing folder of the same study is resumed). */
  out: string;
  /** Override the design's replicate count. */
  replicates?: number;
  /** Worker threads. Default: all cores; more than the cores available are capped (with a warning). 1 runs in this thread. */
  workers?: number;
  /** Run only this slice; merge the shard folders afterwards. */
  shard?: Shard;
  /** Replicates per batch (unit of checkpointing). Default 25. Part of the study's identity. */
  batchSize?: number;
  onProgress?: (p: StudyProgress) => void;
  /** Abort: stop handing out batches; finished batches stay on disk. */
  signal?: AbortSignal;
}

export interface RunStudyResult {
  folder: string;
  scenarios: StudyManifest['scenarios'];
  batchesRun: number;
  batchesSkipped: number;
  /** Every batch of the study (or the shard) is on disk. */
  complete: boolean;
  interrupted: boolean;
  seconds: number;
  /** Design warnings and pre-run checks (e.g. coefficients a variant cannot estimate). */
  warnings: string[];
  /** Summary metrics, when the whole study (not a shard) is complete. */
  metrics: MetricRow[] | null;
  /**
   * The per-replicate rows behind the metrics (as written to replicates.csv), when the metrics are
   * there; a large study's rows are read from replicates.csv on first access.
   */
  replicates: ReplicateRow[] | null;
  /**
   * Seconds spent simulating and fitting (batches, with replicates.csv and the metrics assembled
   * alongside as batches finish), and finishing replicates.csv and the metrics after the last batch.
   */
  timings: { runSeconds: number; finaliseSeconds: number };
}

export const DEFAULT_BATCH_SIZE = 25;

/** Where the compiled worker lives: beside this file when compiled, else in dist/ (tests run on sources). */
function workerPath(): string {
  const here = join(__dirname, 'batch-worker.js');
  if (existsSync(here)) return here;
  const built = join(__dirname, '..', '..', 'dist', 'study', 'batch-worker.js');
  if (existsSync(built)) return built;
  throw new Error('the compiled study worker is missing: run "npm run build" first');
}

/** Resolve the design with an optional replicate override. */
export function resolveStudyDesign(input: unknown, replicates?: number): { design: SurveyDesign; source: unknown } {
  let source = typeof input === 'string' ? JSON.parse(input) : input;
  if (replicates !== undefined) {
    if (!(Number.isInteger(replicates) && replicates >= 1)) {
      throw new QuadratInputError(`--replicates: expected a whole number ≥ 1, got ${replicates}`, { field: '--replicates' });
    }
    source = { ...(source as object), replicates };
  }
  return { design: parseDesign(source), source };
}

/**
 * Try replicate 0 of every scenario with every variant before the run: a variant that cannot be
 * fitted to the simulated data at all stops the study here; coefficients it cannot estimate are
 * named in a warning and studied as 'aliased'.
 */
function preflight(runner: ReplicateRunner, tries = 5): string[] {
  const warnings: string[] = [];
  runner.scenarios.forEach((scenario, s) => {
    const rows = runner.runBatch(s, 0, Math.min(tries, runner.design.replicates));
    for (const variant of scenario.design.variants) {
      const mine = rows.filter((r) => r.variant === variant.name);
      const failed = mine.filter((r) => r.status === 'failed');
      // a random draw can defeat one replicate (e.g. every site dry); refuse only when all tries fail
      if (failed.length === mine.length && mine.length) {
        throw new QuadratInputError(
          `design.variants "${variant.name}" cannot be fitted in scenario ${scenario.key} (${tries} trial replicates): ${failed[0].reason}`,
          { field: 'design.variants' },
        );
      }
      for (const r of mine) {
        if (r.status !== 'aliased') continue;
        // the reason names the real cause: an empty interaction cell, or the columns the coefficient combines
        warnings.push(`variant "${variant.name}" (scenario ${scenario.key}) cannot estimate ${r.parameter}: ${r.reason.replace(/^not estimable: /, '')}; reported as not estimable`);
      }
    }
  });
  return [...new Set(warnings)];
}

/** The identity runStudy gives a study folder: resuming is allowed only into a folder with the same one. */
export function studyFingerprint(input: unknown, options: { replicates?: number; batchSize?: number } = {}): string {
  const { design, source } = resolveStudyDesign(input, options.replicates);
  return fingerprintOfResolved(design, source, options.batchSize ?? DEFAULT_BATCH_SIZE);
}

function fingerprintOfResolved(design: SurveyDesign, source: unknown, batchSize: number): string {
  return fingerprintOf(source, design.replicates, batchSize, design.variants.map((v) => ({ name: v.name, model: v.model })));
}

export async function runStudy(input: unknown, options: RunStudyOptions): Promise<RunStudyResult> {
  const started = Date.now();
  const checked = checkStudyOptions(options as unknown as Record<string, unknown>);
  const { design, source } = resolveStudyDesign(input, options.replicates);
  const batchSize = options.batchSize ?? DEFAULT_BATCH_SIZE;
  checkWritableFolder(options.out);
  const runner = new ReplicateRunner(design);
  const scenarios = runner.scenarios.map((s, index) => ({ index, key: s.key, values: s.values }));
  const warnings = [...design.warnings, ...checked.warnings, ...preflight(runner)];
  const manifest: StudyManifest = {
    format: 'quadrat-study/1', fingerprint: fingerprintOfResolved(design, source, batchSize), design: source,
    replicates: design.replicates, batchSize, scenarios,
  };
  openStudyFolder(options.out, manifest);
  // the folder is this run's until it ends: a second run is refused, and every batch carries the stamp
  const stamp: BatchStamp = { study: manifest.fingerprint, run: randomUUID() };
  const lockNote = acquireFolderLock(options.out, stamp.run);
  if (lockNote) warnings.push(lockNote);
  try {
    return await runLocked(runner, source, options, checked.workers, manifest, stamp, warnings, started);
  } finally {
    releaseFolderLock(options.out, stamp.run);
  }
}

async function runLocked(
  runner: ReplicateRunner, source: unknown, options: RunStudyOptions, maxWorkers: number, manifest: StudyManifest,
  stamp: BatchStamp, warnings: string[], started: number,
): Promise<RunStudyResult> {
  const { scenarios } = manifest;
  const stale = removeStaleTemporaries(options.out);
  if (stale) warnings.push(`removed ${stale} temporary file(s) left by an interrupted run`);
  const all = planBatches(scenarios.length, manifest.replicates, manifest.batchSize);
  const mine = options.shard ? batchesOfShard(all, options.shard) : all;
  const { good: onDiskAtStart, bad } = checkBatches(options.out, stamp.study);
  for (const b of bad) {
    removeBatch(options.out, b.name);
    warnings.push(`batch ${b.name} failed its check (${b.problem}): recomputing it`);
  }
  const todo = mine.filter((b) => !onDiskAtStart.has(batchFileName(b)));
  const resumed = mine.filter((b) => onDiskAtStart.has(batchFileName(b))).reduce((n, b) => n + b.to - b.from, 0);
  const total = todo.reduce((n, b) => n + b.to - b.from, 0);
  let done = 0;
  const report = () => {
    if (!options.onProgress) return;
    const elapsed = (Date.now() - started) / 1000;
    const rate = elapsed > 0 ? done / elapsed : 0;
    options.onProgress({ done, total, resumed, elapsedSeconds: elapsed, replicatesPerSecond: rate, secondsLeft: rate > 0 ? (total - done) / rate : NaN });
  };
  report();
  const workers = Math.max(1, Math.min(maxWorkers, todo.length || 1));
  let ran = 0;
  const runStarted = Date.now();
  // replicates.csv and the metrics grow in study order as batches land (a shard only writes batches)
  const assembly = options.shard ? null : new ReplicateAssembly(options.out, all, stamp.study);
  const written = new Set<number>();
  const onDisk = (b: Batch) => written.has(b.ordinal) || onDiskAtStart.has(batchFileName(b));
  const finish = (b: Batch, csv: string | null) => {
    if (csv !== null) {
      const lost = lockProblem(options.out, stamp.run);
      if (lost) throw new Error(lost);
      writeBatch(options.out, b, csv, stamp);
    }
    written.add(b.ordinal);
    done += b.to - b.from;
    ran++;
    report();
  };
  try {
    assembly?.advance(onDisk);
    if (workers === 1) {
      for (const b of todo) {
        if (options.signal?.aborted) break;
        const rows = runner.runBatch(b.scenario, b.from, b.to);
        const csv = replicateRowsToCsv(rows);
        finish(b, csv);
        assembly?.offer(b, csv, rows);
        assembly?.advance(onDisk);
        // let signals and timers through between batches
        await new Promise((resolve) => setImmediate(resolve));
      }
    } else {
      await runPool(todo, workers, source, options.out, stamp, options.signal, (b) => {
        finish(b, null);
        assembly?.advance(onDisk);
      });
    }
  } catch (e) {
    assembly?.abandon();
    throw e;
  }
  const interrupted = Boolean(options.signal?.aborted) && ran < todo.length;
  const complete = !interrupted && ran === todo.length;
  const runSeconds = (Date.now() - runStarted) / 1000;
  const finaliseStarted = Date.now();
  let summary: AssembledStudy | null = null;
  if (assembly && complete) {
    assembly.advance(onDisk);
    summary = assembly.finish();
  } else {
    assembly?.abandon();
  }
  if (summary) warnings.push(...failureWarnings(summary.metrics));
  const result: RunStudyResult = {
    folder: options.out, scenarios, batchesRun: ran, batchesSkipped: mine.length - todo.length, complete, interrupted,
    seconds: (Date.now() - started) / 1000, warnings, metrics: summary?.metrics ?? null, replicates: null,
    timings: { runSeconds, finaliseSeconds: (Date.now() - finaliseStarted) / 1000 },
  };
  // the rows stay where the assembly keeps them (read from replicates.csv on first access for a large study)
  if (summary) {
    const assembled = summary;
    Object.defineProperty(result, 'replicates', { enumerable: true, get: () => assembled.rows });
  }
  return result;
}

/**
 * Hand batches to a pool of worker threads, two in flight per worker so that a worker never waits
 * for the main thread; each worker writes its finished batches to the folder itself.
 */
function runPool(
  todo: Batch[], count: number, source: unknown, folder: string, stamp: BatchStamp, signal: AbortSignal | undefined, finished: (b: Batch) => void,
): Promise<void> {
  const IN_FLIGHT = 2;
  return new Promise((resolve, reject) => {
    const path = workerPath();
    let next = 0;
    let active = 0;
    let settled = false;
    const pool: Worker[] = [];
    const stopAll = () => { for (const w of pool) void w.terminate(); };
    const done = () => { if (!settled) { settled = true; stopAll(); resolve(); } };
    const fail = (e: Error) => { if (!settled) { settled = true; stopAll(); reject(e); } };
    const dispatch = (w: Worker) => {
      if (settled) return;
      if (signal?.aborted || next >= todo.length) {
        if (active === 0) done();
        return;
      }
      const b = todo[next++];
      active++;
      w.postMessage({ ordinal: b.ordinal, scenario: b.scenario, batch: b.batch, from: b.from, to: b.to } satisfies BatchTask);
    };
    const byOrdinal = new Map(todo.map((b) => [b.ordinal, b]));
    for (let i = 0; i < count; i++) {
      // a larger young generation: fits allocate many short-lived objects, and the default nursery of a
      // worker thread makes the scavenger run far more often than in the main thread
      const w = new Worker(path, { workerData: { design: source, folder, stamp }, resourceLimits: { maxYoungGenerationSizeMb: 64 } });
      pool.push(w);
      w.on('message', (reply: BatchReply) => {
        active--;
        if ('error' in reply) {
          fail(new Error(`batch ${reply.ordinal} failed: ${reply.error}`));
          return;
        }
        if (!settled) finished(byOrdinal.get(reply.ordinal)!);
        dispatch(w);
      });
      w.on('error', (e) => fail(e));
      for (let k = 0; k < IN_FLIGHT; k++) dispatch(w);
    }
    signal?.addEventListener('abort', () => { if (active === 0) done(); }, { once: true });
  });
}

/** Write replicates.csv and the metrics once every batch is on disk (each checked; with `study`, also who wrote it). */
export function finalise(folder: string, batches: Batch[], study = ''): AssembledStudy | null {
  const assembly = new ReplicateAssembly(folder, batches, study);
  assembly.advance((b) => existsSync(batchPath(folder, batchFileName(b))));
  return assembly.finish();
}
