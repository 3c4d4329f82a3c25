/** Worker-thread entry: runs ranges of bootstrap resamples of one model and sends the results back. */
import { parentPort, workerData } from 'node:worker_threads';
import { createBootstrapRunner, type BootstrapModel } from './bootstrap';

export interface BootstrapTask {
  from: number;
  to: number;
}

export type BootstrapReply = { from: number; to: number; results: Float64Array } | { from: number; error: string };

if (parentPort) {
  const port = parentPort;
  const runner = createBootstrapRunner((workerData as { model: BootstrapModel }).model);
  port.on('message', (task: BootstrapTask) => {
    try {
      const results = runner.run(task.from, task.to);
      port.postMessage({ from: task.from, to: task.to, results } satisfies BootstrapReply, [results.buffer]);
    } catch (e) {
      port.postMessage({ from: task.from, error: (e as Error).message } satisfies BootstrapReply);
    }
  });
}
