import { copyFileSync, existsSync } from 'node:fs';
import { join } from 'node:path';
import { QuadratInputError } from '../model/errors';
import { batchFileName, planBatches } from './batch-plan';
import type { MetricRow } from './metrics';
import { finalise } from './run-study';
import { finishedBatches, openStudyFolder, readManifest } from './study-folder';

/**
 * Combine shard folders of one study into a single folder whose replicates.csv and metrics are
 * identical to a single-machine run: batches are copied as they are and assembled in study order.
 */
export function mergeShards(folders: string[], out: string): { batches: number; metrics: MetricRow[] } {
  if (!folders.length) throw new QuadratInputError('study merge: name at least one shard folder', { field: 'folders' });
  const manifests = folders.map((f) => readManifest(f));
  const first = manifests[0];
  manifests.forEach((m, i) => {
    if (m.fingerprint !== first.fingerprint) {
      throw new QuadratInputError(`study merge: "${folders[i]}" belongs to a different study than "${folders[0]}" (design or settings differ)`, { field: 'folders' });
    }
  });
  openStudyFolder(out, first);
  const all = planBatches(first.scenarios.length, first.replicates, first.batchSize);
  for (const folder of folders) {
    for (const name of finishedBatches(folder)) {
      const target = join(out, 'batches', name);
      if (!existsSync(target)) copyFileSync(join(folder, 'batches', name), target);
    }
  }
  const have = finishedBatches(out);
  const missing = all.filter((b) => !have.has(batchFileName(b)));
  if (missing.length) {
    throw new QuadratInputError(
      `study merge: ${missing.length} of ${all.length} batches are missing (first: scenario ${missing[0].scenario}, replicates ${missing[0].from}-${missing[0].to - 1}); run the missing shards and merge again`,
      { field: 'folders' },
    );
  }
  const { metrics } = finalise(out, all)!;
  return { batches: all.length, metrics };
}
