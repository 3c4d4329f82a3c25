/**
 * Worker-thread entry: runs batches of a study and writes each batch file itself (atomically), so
 * the main thread neither copies nor writes the CSV text and stays free to hand out work.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { parseDesign } from '../design/parse';
import { ReplicateRunner } from './replicate-runner';
import { replicateRowsToCsv } from './replicate-csv';
import { writeBatch, type BatchStamp } from './batch-files';
import { lockProblem } from './folder-lock';

export interface BatchTask {
  ordinal: number;
  scenario: number;
  batch: number;
  from: number;
  to: number;
}

export type BatchReply = { ordinal: number; replicates: number } | { ordinal: number; error: string };

if (parentPort) {
  const port = parentPort;
  const { design, folder, stamp } = workerData as { design: unknown; folder: string; stamp: BatchStamp };
  const runner = new ReplicateRunner(parseDesign(design));
  port.on('message', (task: BatchTask) => {
    try {
      const rows = runner.runBatch(task.scenario, task.from, task.to);
      // the folder may have been deleted and reused since the run began: never write into another run's folder
      const lost = lockProblem(folder, stamp.run);
      if (lost) throw new Error(lost);
      writeBatch(folder, task, replicateRowsToCsv(rows), stamp);
      port.postMessage({ ordinal: task.ordinal, replicates: task.to - task.from } satisfies BatchReply);
    } catch (e) {
      port.postMessage({ ordinal: task.ordinal, error: (e as Error).message } satisfies BatchReply);
    }
  });
}
