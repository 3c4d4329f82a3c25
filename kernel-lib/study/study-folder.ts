import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { QuadratInputError } from '../model/errors';
import { batchFileName, type Batch } from './batch-plan';
import { REPLICATE_HEADER } from './replicate-csv';

/**
 * Layout of a study's output folder:
 *   study.json        the design as given, the run settings and a fingerprint of both
 *   scenarios.json    index, key and grid values of every scenario
 *   batches/          one CSV per finished batch (written atomically: a batch is there whole or not at all)
 *   replicates.csv    all batches in study order (written when every batch is present)
 *   metrics.csv/.json the summary with Monte Carlo SEs
 */
export interface StudyManifest {
  format: 'quadrat-study/1';
  fingerprint: string;
  design: unknown;
  replicates: number;
  batchSize: number;
  scenarios: { index: number; key: string; values: Record<string, number | string> }[];
}

/**
 * Identity of a study: the design as given, the variants with every default filled in (so a
 * changed default, e.g. the interval method, is a different study), the replicate count, the
 * batch size and the project version. Resuming is allowed only into a folder with the same identity.
 */
export function fingerprintOf(design: unknown, replicates: number, batchSize: number, resolvedVariants: unknown = null): string {
  return createHash('sha256')
    .update(JSON.stringify({ design, replicates, batchSize, resolvedVariants, version: PROJECT_VERSION }))
    .digest('hex')
    .slice(0, 16);
}

/** The project's version (package.json), part of a study's identity. */
export const PROJECT_VERSION: string = (() => {
  try {
    return (JSON.parse(readFileSync(join(__dirname, '..', '..', 'package.json'), 'utf8')) as { version: string }).version;
  } catch {
    return 'unknown';
  }
})();

/** Write text atomically: to a temporary name in the same folder, then rename over the target. */
export function writeAtomic(path: string, text: string): void {
  const tmp = `${path}.tmp-${process.pid}`;
  writeFileSync(tmp, text);
  renameSync(tmp, path);
}

/**
 * Create the folder, or check that an existing one belongs to the same study (same design and
 * settings), so that resuming never mixes results of two different studies.
 */
export function openStudyFolder(folder: string, manifest: StudyManifest): void {
  mkdirSync(join(folder, 'batches'), { recursive: true });
  const path = join(folder, 'study.json');
  if (existsSync(path)) {
    const old = JSON.parse(readFileSync(path, 'utf8')) as StudyManifest;
    if (old.fingerprint !== manifest.fingerprint) {
      throw new QuadratInputError(
        `--out: folder "${folder}" holds results of a different study (design or replicate count changed); choose another folder or delete it`,
        { field: '--out' },
      );
    }
    return;
  }
  writeAtomic(path, JSON.stringify(manifest, null, 2));
  writeAtomic(join(folder, 'scenarios.json'), JSON.stringify(manifest.scenarios, null, 2));
}

export function readManifest(folder: string): StudyManifest {
  const path = join(folder, 'study.json');
  if (!existsSync(path)) throw new QuadratInputError(`"${folder}" is not a study folder (no study.json)`, { field: 'folder' });
  return JSON.parse(readFileSync(path, 'utf8')) as StudyManifest;
}

/** File names of finished batches. */
export function finishedBatches(folder: string): Set<string> {
  const dir = join(folder, 'batches');
  if (!existsSync(dir)) return new Set();
  return new Set(readdirSync(dir).filter((f) => f.endsWith('.csv')));
}

export function writeBatch(folder: string, batch: Pick<Batch, 'scenario' | 'batch'>, csv: string): void {
  writeAtomic(join(folder, 'batches', batchFileName(batch)), csv);
}

/**
 * Concatenate all batches in study order into replicates.csv; returns its text (so the caller need
 * not read it back), or null when some batches are missing.
 */
export function assembleReplicates(folder: string, batches: readonly Batch[]): string | null {
  const done = finishedBatches(folder);
  if (!batches.every((b) => done.has(batchFileName(b)))) return null;
  const parts = [`${REPLICATE_HEADER}\n`];
  for (const b of batches) parts.push(readFileSync(join(folder, 'batches', batchFileName(b)), 'utf8'));
  const text = parts.join('');
  writeAtomic(join(folder, 'replicates.csv'), text);
  return text;
}
