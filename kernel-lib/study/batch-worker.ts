/**
 * Worker-thread entry: runs batches of a study and writes each batch file itself (atomically), so
 * the main thread neither copies nor writes the CSV text and stays free to hand out work.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { parseDesign } from '../design/parse';
import { ReplicateRunner } from './replicate-runner';
import { replicateRowsToCsv } from './replicate-csv';
import { writeBatch } from './study-folder';

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
  const { design, folder } = workerData as { design: unknown; folder: string };
  const runner = new ReplicateRunner(parseDesign(design));
  port.on('message', (task: BatchTask) => {
    try {
      const rows = runner.runBatch(task.scenario, task.from, task.to);
      writeBatch(folder, task, replicateRowsToCsv(rows));
      port.postMessage({ ordinal: task.ordinal, replicates: task.to - task.from } satisfies BatchReply);
    } catch (e) {
      port.postMessage({ ordinal: task.ordinal, error: (e as Error).message } satisfies BatchReply);
    }
  });
}
