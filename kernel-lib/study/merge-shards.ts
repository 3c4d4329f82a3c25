import { copyFileSync, existsSync, renameSync } from 'node:fs';
import { QuadratInputError } from '../model/errors';
import { planBatches } from './batch-plan';
import { batchCheckPath, batchFileName, batchPath, temporaryPath } from './folder-layout';
import type { MetricRow } from './metrics';
import { finalise } from './run-study';
import { finishedBatches, openStudyFolder, readManifest } from './study-folder';
import { checkBatches } from './batch-files';
import { checkWritableFolder } from './folder-lock';

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
  checkWritableFolder(out);
  openStudyFolder(out, first);
  const all = planBatches(first.scenarios.length, first.replicates, first.batchSize);
  for (const folder of folders) {
    // only batches that pass their check (rows, checksum, this study) are copied, with their check
    const { good, bad } = checkBatches(folder, first.fingerprint);
    if (bad.length) {
      throw new QuadratInputError(
        `study merge: batch ${bad[0].name} in "${folder}" failed its check (${bad[0].problem})${bad.length > 1 ? ` and ${bad.length - 1} more` : ''}; run that shard again to recompute it, then merge`,
        { field: 'folders' },
      );
    }
    for (const name of good) {
      const target = batchPath(out, name);
      const targetCheck = batchCheckPath(out, name);
      if (!existsSync(target)) {
        copyFileSync(batchCheckPath(folder, name), temporaryPath(targetCheck));
        copyFileSync(batchPath(folder, name), temporaryPath(target));
        renameSync(temporaryPath(target), target);
        renameSync(temporaryPath(targetCheck), targetCheck);
      }
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
  const { metrics } = finalise(out, all, first.fingerprint)!;
  return { batches: all.length, metrics };
}
