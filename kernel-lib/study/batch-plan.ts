/**
 * How a study is cut into batches, and which batches a shard runs. A batch is the unit of work,
 * of checkpointing and of sharding; its replicates are fixed by (scenario, batch) alone, so the
 * results never depend on the worker count, the order of completion or the sharding.
 */
import { QuadratInputError } from '../model/errors';

export interface Batch {
  /** Position in the study's batch list (scenario-major). */
  ordinal: number;
  scenario: number;
  /** Batch number within the scenario. */
  batch: number;
  /** Replicates [from, to). */
  from: number;
  to: number;
}

export interface Shard {
  /** 1-based shard number. */
  index: number;
  count: number;
}

export function planBatches(scenarios: number, replicates: number, batchSize: number): Batch[] {
  // the size comes from study.json when resuming or merging: a hand-edited 0 would never end the loop
  if (!(Number.isInteger(batchSize) && batchSize >= 1)) {
    throw new QuadratInputError(`batch size: expected a whole number ≥ 1, got ${batchSize}`, { field: 'batchSize' });
  }
  const out: Batch[] = [];
  for (let s = 0; s < scenarios; s++) {
    for (let b = 0, from = 0; from < replicates; b++, from += batchSize) {
      out.push({ ordinal: out.length, scenario: s, batch: b, from, to: Math.min(replicates, from + batchSize) });
    }
  }
  return out;
}

/** Shard i of N takes every N-th batch starting at i − 1: balanced across scenarios. */
export function batchesOfShard(batches: readonly Batch[], shard: Shard): Batch[] {
  return batches.filter((b) => b.ordinal % shard.count === shard.index - 1);
}

/** Parse "i/N" (1 ≤ i ≤ N). */
export function parseShard(text: string): Shard {
  const m = /^(\d+)\/(\d+)$/.exec(text.trim());
  const index = m ? Number(m[1]) : NaN;
  const count = m ? Number(m[2]) : NaN;
  if (!m || !(count >= 1) || !(index >= 1 && index <= count)) {
    throw new QuadratInputError(`--shard: expected "i/N" with 1 ≤ i ≤ N (e.g. "2/8"), got "${text}"`, { field: '--shard' });
  }
  return { index, count };
}
