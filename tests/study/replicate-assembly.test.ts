import { describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { planBatches } from '../../kernel-lib/study/batch-plan';
import { readCheckedBatch } from '../../kernel-lib/study/batch-files';
import { summarise } from '../../kernel-lib/study/metrics';
import { ReplicateAssembly } from '../../kernel-lib/study/replicate-assembly';
import { parseReplicateCsv, REPLICATE_HEADER } from '../../kernel-lib/study/replicate-csv';
import { runStudy } from '../../kernel-lib/study/run-study';
import { variantLevels } from '../../kernel-lib/study/variant-levels';
import { parseDesign } from '../../kernel-lib/design/parse';

const fresh = (name: string) => join(mkdtempSync(join(tmpdir(), 'quadrat-assembly-')), name);

/** A small invented survey design (two scenarios, two variants). */
const design = {
  seed: 5, replicates: 30,
  factors: [{ name: 'site', levels: 5 }], perCell: 3,
  covariates: [{ name: 'rain', varies: 'observation', normal: { mean: 0, sd: 1 } }],
  truth: { fixed: { intercept: 2, rain: 0.4 }, sd: { site: 1, residual: 1 } },
  variants: [
    { name: 'site random', model: { response: 'y', fixed: ['rain'], groups: [{ factor: 'site', as: 'random' }] } },
    { name: 'site fixed', model: { response: 'y', fixed: ['rain'], groups: [{ factor: 'site', as: 'fixed' }] } },
  ],
  grid: { 'factors.site.levels': [4, 6] },
};

describe('replicates.csv and metrics assembled while the study runs', () => {
  it('equal the batches concatenated in study order and the metrics of all rows at once (identity: assembly is concatenation)', async () => {
    const out = fresh('run');
    const result = await runStudy(design, { out, workers: 1, batchSize: 7 });
    const all = planBatches(2, 30, 7);
    const batches = all.map((b) => {
      const r = readCheckedBatch(out, `s${String(b.scenario).padStart(4, '0')}-b${String(b.batch).padStart(6, '0')}.csv`);
      if (!('text' in r)) throw new Error(r.problem);
      return r.text;
    });
    const text = readFileSync(join(out, 'replicates.csv'), 'utf8');
    expect(text).toBe(`${REPLICATE_HEADER}\n${batches.join('')}`);
    const rows = parseReplicateCsv(text);
    const metrics = summarise(rows, { levels: variantLevels(parseDesign(design)) });
    expect(JSON.parse(readFileSync(join(out, 'metrics.json'), 'utf8'))).toEqual(JSON.parse(JSON.stringify(metrics, null, 1)));
    expect(result.replicates).toEqual(rows);
    expect(readdirSync(out).filter((f) => f.includes('.tmp-'))).toEqual([]);
  });

  it('hands back rows beyond its in-memory limit by reading replicates.csv, and writes nothing while batches are missing', async () => {
    const out = fresh('limit');
    await runStudy(design, { out, workers: 1, batchSize: 7 });
    const all = planBatches(2, 30, 7);
    const assembly = new ReplicateAssembly(out, all, '', 10);
    assembly.advance(() => true);
    const done = assembly.finish()!;
    expect(done.rows).toEqual(parseReplicateCsv(readFileSync(join(out, 'replicates.csv'), 'utf8')));
    const partial = new ReplicateAssembly(out, all, '');
    partial.advance((b) => b.ordinal < 3);
    expect(partial.complete).toBe(false);
    expect(partial.finish()).toBeNull();
    expect(readdirSync(out).filter((f) => f.includes('.tmp-'))).toEqual([]);
  });

  it('an aborted run leaves no replicates.csv and no temporary file', async () => {
    const out = fresh('abort');
    const controller = new AbortController();
    const result = await runStudy(design, {
      out, workers: 1, batchSize: 7, signal: controller.signal, onProgress: (p) => { if (p.done >= 14) controller.abort(); },
    });
    expect(result.interrupted).toBe(true);
    expect(existsSync(join(out, 'replicates.csv'))).toBe(false);
    expect(readdirSync(out).filter((f) => f.includes('.tmp-'))).toEqual([]);
  });
});
