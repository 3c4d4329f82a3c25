/**
 * Bootstrap resamples spread over worker threads. Each resample has its own random stream (see
 * ./bootstrap), so the results are identical whatever the number of workers.
 */
import { existsSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { modelBootstrapWidth, runBootstrapInThread, type BootstrapModel } from './bootstrap';
import type { BootstrapReply, BootstrapTask } from './bootstrap-worker';

/** Resamples per task handed to a worker. */
const CHUNK = 50;
/** Below this many resamples a pool costs more than it saves. */
const MIN_PARALLEL = 200;

function workerPath(): string {
  const here = join(__dirname, 'bootstrap-worker.js');
  if (existsSync(here)) return here;
  const built = join(__dirname, '..', '..', '..', 'dist', 'fit', 'inference', 'bootstrap-worker.js');
  if (existsSync(built)) return built;
  throw new Error('the compiled bootstrap worker is missing: run "npm run build" first');
}

export interface ParallelBootstrapOptions {
  /** Worker threads. Default: all cores. 1 runs in this thread. */
  workers?: number;
  onProgress?: (done: number, total: number) => void;
}

/** All resamples, row-major resamples × width, computed on `workers` threads. */
export async function runBootstrapParallel(model: BootstrapModel, resamples: number, options: ParallelBootstrapOptions = {}): Promise<Float64Array> {
  const workers = Math.max(1, Math.min(options.workers ?? availableParallelism(), Math.ceil(resamples / CHUNK)));
  if (workers === 1 || (resamples < MIN_PARALLEL && options.workers === undefined)) {
    return runBootstrapInThread(model, resamples, options.onProgress);
  }
  const width = modelBootstrapWidth(model);
  const out = new Float64Array(resamples * width);
  const tasks: BootstrapTask[] = [];
  for (let from = 0; from < resamples; from += CHUNK) tasks.push({ from, to: Math.min(resamples, from + CHUNK) });
  const path = workerPath();
  return new Promise((resolve, reject) => {
    let next = 0;
    let active = 0;
    let done = 0;
    let failed = false;
    const pool: Worker[] = [];
    const stopAll = () => { for (const w of pool) void w.terminate(); };
    const dispatch = (w: Worker) => {
      if (failed) return;
      if (next >= tasks.length) {
        if (active === 0) { stopAll(); resolve(out); }
        return;
      }
      active++;
      w.postMessage(tasks[next++]);
    };
    for (let i = 0; i < workers; i++) {
      const w = new Worker(path, { workerData: { model } });
      pool.push(w);
      w.on('message', (reply: BootstrapReply) => {
        active--;
        if ('error' in reply) {
          failed = true;
          stopAll();
          reject(new Error(`bootstrap resamples from ${reply.from} failed: ${reply.error}`));
          return;
        }
        out.set(reply.results, reply.from * width);
        done += reply.to - reply.from;
        options.onProgress?.(done, resamples);
        dispatch(w);
      });
      w.on('error', (e) => { if (!failed) { failed = true; stopAll(); reject(e); } });
      dispatch(w);
    }
  });
}
