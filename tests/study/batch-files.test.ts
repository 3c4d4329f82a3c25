import { describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, truncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runStudy } from '../../kernel-lib/study/run-study';
import { mergeShards } from '../../kernel-lib/study/merge-shards';
import { checkBatches, readCheckedBatch, removeStaleTemporaries, writeBatch } from '../../kernel-lib/study/batch-files';

const fresh = (name: string) => join(mkdtempSync(join(tmpdir(), 'quadrat-batches-')), name);
const read = (folder: string, file: string) => readFileSync(join(folder, file), 'utf8');

/** A small invented survey design (two scenarios). */
const design = {
  seed: 11, replicates: 50,
  factors: [{ name: 'site', levels: 6 }, { name: 'year', levels: 3 }],
  perCell: 2,
  covariates: [{ name: 'rain', varies: 'observation', normal: { mean: 0, sd: 1 } }],
  truth: { fixed: { intercept: 10, rain: 0.5 }, sd: { site: 1, year: 0.5, residual: 2 } },
  variants: [{ name: 'both random', model: { response: 'y', fixed: ['rain'], groups: [{ factor: 'site', as: 'random' }, { factor: 'year', as: 'random' }] } }],
  grid: { 'factors.site.levels': [4, 6] },
};

describe('batch checks', () => {
  it('a batch passes its check until it is cut, emptied, changed or stamped by another study', () => {
    const folder = fresh('unit');
    mkdirSync(join(folder, 'batches'), { recursive: true });
    const csv = 'a,1\nb,2\nc,3\n';
    writeBatch(folder, { scenario: 0, batch: 0 }, csv, { study: 'S1', run: 'r1' });
    const name = 's0000-b000000.csv';
    expect(readCheckedBatch(folder, name, 'S1')).toEqual({ text: csv });
    expect(readCheckedBatch(folder, name, 'S2')).toEqual({ problem: 'it was written by another study (S1), not this one (S2)' });
    writeFileSync(join(folder, 'batches', name), 'a,1\nb,2\n'); // cut at a line boundary
    expect(readCheckedBatch(folder, name, 'S1')).toEqual({ problem: 'it has 2 rows where 3 were written' });
    writeFileSync(join(folder, 'batches', name), 'a,1\nb,2\nc,4\n'); // same rows, other content
    expect(readCheckedBatch(folder, name)).toEqual({ problem: 'its content differs from what was written (checksum mismatch)' });
    writeFileSync(join(folder, 'batches', 's0000-b000001.csv'), csv); // no check file
    expect(checkBatches(folder).bad.map((b) => b.name)).toEqual([name, 's0000-b000001.csv']);
    writeFileSync(join(folder, 'batches', 's0000-b000002.csv.tmp-999'), 'partial');
    writeFileSync(join(folder, 'metrics.csv.tmp-998'), 'partial');
    expect(removeStaleTemporaries(folder)).toBe(2);
  });
});

describe('kill, damage and resume', () => {
  // 10 replicates × (2 coefficients + 3 SDs) = 50 rows per batch
  it('an interrupted run whose batches were damaged resumes to results byte-identical to a straight run', async () => {
    const straight = fresh('straight');
    await runStudy(design, { out: straight, workers: 1, batchSize: 10 });

    const damaged = fresh('damaged');
    const controller = new AbortController();
    let seen = 0;
    const first = await runStudy(design, {
      out: damaged, workers: 1, batchSize: 10, signal: controller.signal,
      onProgress: (p) => { if (p.done > 0 && ++seen === 6) controller.abort(); },
    });
    expect(first.interrupted).toBe(true);
    const dir = join(damaged, 'batches');
    const names = readdirSync(dir).filter((f) => f.endsWith('.csv')).sort();
    expect(names.length).toBe(6);
    truncateSync(join(dir, names[0]), 0); // a 0-byte batch
    const text = readFileSync(join(dir, names[1]), 'utf8');
    writeFileSync(join(dir, names[1]), text.slice(0, text.lastIndexOf('\n', text.length - 2) + 1)); // cut at a line boundary
    writeFileSync(join(dir, 's0001-b000004.csv.tmp-12345'), 'half a batch'); // left by a kill -9

    const second = await runStudy(design, { out: damaged, workers: 2, batchSize: 10 });
    expect(second.complete).toBe(true);
    expect(second.warnings).toContain(`batch ${names[0]} failed its check (it has 0 rows where 50 were written): recomputing it`);
    expect(second.warnings.some((w) => w.startsWith(`batch ${names[1]} failed its check (it has 49 rows where 50 were written)`))).toBe(true);
    expect(second.warnings).toContain('removed 1 temporary file(s) left by an interrupted run');
    expect(second.batchesSkipped).toBe(4);
    for (const file of ['replicates.csv', 'metrics.csv', 'metrics.json']) expect(read(damaged, file)).toBe(read(straight, file));
    expect(existsSync(join(damaged, 'study.lock'))).toBe(false);
  });

  it('merging refuses a shard with a damaged batch, naming it', async () => {
    const shard = fresh('shard');
    await runStudy(design, { out: shard, workers: 1, batchSize: 10, shard: { index: 1, count: 2 } });
    const name = readdirSync(join(shard, 'batches')).filter((f) => f.endsWith('.csv')).sort()[0];
    truncateSync(join(shard, 'batches', name), 0);
    expect(() => mergeShards([shard], fresh('merged'))).toThrow(`study merge: batch ${name} in "${shard}" failed its check (it has 0 rows`);
  });
});
