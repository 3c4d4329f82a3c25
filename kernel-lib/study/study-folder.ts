import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { QuadratInputError } from '../model/errors';
import { batchesFolder, manifestPath, scenariosPath } from './folder-layout';
import { writeAtomic } from './batch-files';

export { finishedBatches, writeAtomic, writeBatch } from './batch-files';

/**
 * A study folder's manifest (study.json); the folder's layout is ./folder-layout, the assembly of
 * replicates.csv and the metrics ./replicate-assembly. Files are written as temporary file, flush, rename: whole or not at all.
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

/**
 * Create the folder, or check that an existing one belongs to the same study (same design and
 * settings), so that resuming never mixes results of two different studies.
 */
export function openStudyFolder(folder: string, manifest: StudyManifest): void {
  mkdirSync(batchesFolder(folder), { recursive: true });
  const path = manifestPath(folder);
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
  writeAtomic(scenariosPath(folder), JSON.stringify(manifest.scenarios, null, 2));
}

export function readManifest(folder: string): StudyManifest {
  const path = manifestPath(folder);
  if (!existsSync(path)) throw new QuadratInputError(`"${folder}" is not a study folder (no study.json)`, { field: 'folder' });
  return JSON.parse(readFileSync(path, 'utf8')) as StudyManifest;
}
