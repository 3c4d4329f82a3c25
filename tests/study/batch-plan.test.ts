import { describe, expect, it } from 'vitest';
import { batchesOfShard, parseShard, planBatches } from '../../kernel-lib/study/batch-plan';
import { inputError } from '../helpers/input-error';

// A batch plan is a partition of (scenario, replicate) pairs, and shards partition the batches
// (DEVELOPERS.md, "Randomness and reproducibility"; common practice, no source).
describe('planBatches', () => {
  it('covers every replicate of every scenario exactly once, in scenario-major order', () => {
    const plan = planBatches(3, 60, 25);
    expect(plan.map((b) => [b.scenario, b.batch, b.from, b.to])).toEqual([
      [0, 0, 0, 25], [0, 1, 25, 50], [0, 2, 50, 60],
      [1, 0, 0, 25], [1, 1, 25, 50], [1, 2, 50, 60],
      [2, 0, 0, 25], [2, 1, 25, 50], [2, 2, 50, 60],
    ]);
    expect(plan.map((b) => b.ordinal)).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8]);
  });

  it('depends only on scenario count, replicates and batch size (the replicates of a batch are fixed)', () => {
    for (const [s, r, size] of [[1, 1, 25], [2, 25, 25], [4, 101, 7], [1, 3, 10]]) {
      const plan = planBatches(s, r, size);
      for (let sc = 0; sc < s; sc++) {
        const covered = plan.filter((b) => b.scenario === sc).flatMap((b) => Array.from({ length: b.to - b.from }, (_, k) => b.from + k));
        expect(covered).toEqual(Array.from({ length: r }, (_, k) => k));
      }
      expect(plan.every((b) => b.to - b.from <= size && b.to > b.from)).toBe(true);
    }
    expect(planBatches(2, 0, 25)).toEqual([]);
  });

  it('refuses a batch size that is not a whole number ≥ 1 (read back from study.json) instead of looping', () => {
    for (const bad of [0, -5, 2.5, NaN, undefined as unknown as number]) {
      expect(inputError(() => planBatches(1, 10, bad)).field).toBe('batchSize');
    }
  });
});

describe('batchesOfShard', () => {
  it('shards partition the batches, each taking every N-th one', () => {
    const plan = planBatches(3, 60, 25);
    const shards = [1, 2, 3, 4].map((index) => batchesOfShard(plan, { index, count: 4 }));
    expect(shards[0].map((b) => b.ordinal)).toEqual([0, 4, 8]);
    expect(shards[3].map((b) => b.ordinal)).toEqual([3, 7]);
    expect(shards.flat().map((b) => b.ordinal).sort((a, b) => a - b)).toEqual(plan.map((b) => b.ordinal));
    expect(batchesOfShard(plan, { index: 1, count: 1 })).toEqual(plan);
  });
});

describe('parseShard', () => {
  it('reads "i/N" with 1 ≤ i ≤ N', () => {
    expect(parseShard('2/8')).toEqual({ index: 2, count: 8 });
    expect(parseShard(' 1/1 ')).toEqual({ index: 1, count: 1 });
  });

  it('refuses anything else with a message naming --shard', () => {
    for (const bad of ['0/4', '5/4', '1/0', '2', 'a/b', '1.5/4', '-1/4', '']) {
      const e = inputError(() => parseShard(bad));
      expect(e.field).toBe('--shard');
      expect(e.message).toContain(`got "${bad}"`);
    }
  });
});
