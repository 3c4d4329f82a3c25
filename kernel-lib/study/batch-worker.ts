/** Worker-thread entry: runs batches of a study and sends each back as CSV text. */
import { parentPort, workerData } from 'node:worker_threads';
import { parseDesign } from '../design/parse';
import { ReplicateRunner } from './replicate-runner';
import { replicateRowsToCsv } from './replicate-csv';
import { realisedTruthOf } from './realised-truth';

export interface BatchTask {
  ordinal: number;
  scenario: number;
  from: number;
  to: number;
}

export type BatchReply = { ordinal: number; csv: string; replicates: number } | { ordinal: number; error: string };

if (parentPort) {
  const port = parentPort;
  const runner = new ReplicateRunner(parseDesign((workerData as { design: unknown }).design), realisedTruthOf);
  port.on('message', (task: BatchTask) => {
    try {
      const rows = runner.runBatch(task.scenario, task.from, task.to);
      port.postMessage({ ordinal: task.ordinal, csv: replicateRowsToCsv(rows), replicates: task.to - task.from } satisfies BatchReply);
    } catch (e) {
      port.postMessage({ ordinal: task.ordinal, error: (e as Error).message } satisfies BatchReply);
    }
  });
}
