/**
 * runStudy's options checked with the messages of the command line (model/option-checks): a shard
 * beyond the count, a batch size of 0 or a negative worker count is refused before anything runs.
 */
import { availableParallelism } from 'node:os';
import { QuadratInputError, describeValue } from '../model/errors';
import { checkShard, expectInteger } from '../model/option-checks';

export interface StudyOptionsChecked {
  /** Worker threads to start: the request capped at the cores available. */
  workers: number;
  /** Said when the worker request was capped. */
  warnings: string[];
}

/** Largest batch: a batch is held in memory as rows before it is written. */
const MAX_BATCH_SIZE = 100_000;

export function checkStudyOptions(options: Record<string, unknown>, cores = availableParallelism()): StudyOptionsChecked {
  if (typeof options !== 'object' || options === null) {
    throw new QuadratInputError(`options: expected an object with at least { out }, got ${describeValue(options)}`, { field: 'options' });
  }
  if (typeof options.out !== 'string' || options.out.trim() === '') {
    throw new QuadratInputError(`options.out: expected the path of the study folder, got ${describeValue(options.out)}`, { field: 'options.out' });
  }
  if (options.replicates !== undefined) expectInteger(options.replicates, 'options.replicates', 1);
  if (options.batchSize !== undefined) expectInteger(options.batchSize, 'options.batchSize', 1, MAX_BATCH_SIZE);
  if (options.shard !== undefined) checkShard(options.shard, 'options.shard');
  for (const key of ['onProgress'] as const) {
    if (options[key] !== undefined && typeof options[key] !== 'function') {
      throw new QuadratInputError(`options.${key}: expected a function, got ${describeValue(options[key])}`, { field: `options.${key}` });
    }
  }
  const warnings: string[] = [];
  let workers = cores;
  if (options.workers !== undefined) {
    workers = expectInteger(options.workers, 'options.workers', 1);
    if (workers > cores) {
      warnings.push(`${workers} workers requested but ${cores} cores are available: using ${cores}`);
      workers = cores;
    }
  }
  return { workers, warnings };
}
