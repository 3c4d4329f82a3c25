/**
 * Worker-thread entry of a plan: each task names the design of one candidate value (a one-value
 * grid, so its replicates are those of a study with that scenario) and the folder of its batches.
 * Runners are kept per folder, so a worker builds each value's simulation plan once.
 */
import { parentPort } from 'node:worker_threads';
import { parseDesign } from '../design/parse';
import { replicateRowsToCsv } from './replicate-csv';
import { ReplicateRunner } from './replicate-runner';
import { writeBatch } from './study-folder';

export interface PlanBatchTask {
  id: number;
  design: unknown;
  folder: string;
  batch: number;
  from: number;
  to: number;
}

export type PlanBatchReply = { id: number } | { id: number; error: string };

/** Run one batch of a candidate value and write it (atomically) into the value's folder. */
export function runPlanBatch(runners: Map<string, ReplicateRunner>, task: PlanBatchTask): void {
  let runner = runners.get(task.folder);
  if (!runner) {
    runner = new ReplicateRunner(parseDesign(task.design));
    runners.set(task.folder, runner);
  }
  writeBatch(task.folder, { scenario: 0, batch: task.batch }, replicateRowsToCsv(runner.runBatch(0, task.from, task.to)));
}

if (parentPort) {
  const port = parentPort;
  const runners = new Map<string, ReplicateRunner>();
  port.on('message', (task: PlanBatchTask) => {
    try {
      runPlanBatch(runners, task);
      port.postMessage({ id: task.id } satisfies PlanBatchReply);
    } catch (e) {
      port.postMessage({ id: task.id, error: (e as Error).message } satisfies PlanBatchReply);
    }
  });
}
