/**
 * Batch files of a study folder and their checks (names: ./folder-layout). Each batch holds rows
 * without header, so that replicates.csv is their concatenation, beside a check file recording
 * its row count, SHA-256 and the study and run that wrote it. Both are written as temporary file,
 * flush, rename; a batch whose check is missing or does not match (cut short, emptied, written by
 * another study) is not trusted.
 */
import { createHash } from 'node:crypto';
import { closeSync, existsSync, fsyncSync, openSync, readdirSync, readFileSync, renameSync, rmSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import type { Batch } from './batch-plan';
import { batchCheckPath, batchFileName, batchPath, batchesFolder, isBatchFile, isTemporary, temporaryFolders, temporaryPath } from './folder-layout';

/** Who wrote a batch: the study's fingerprint and the run (one per runStudy call). */
export interface BatchStamp {
  study: string;
  run: string;
}

interface BatchCheck {
  format: 'quadrat-batch-check/1';
  rows: number;
  sha256: string;
  study: string;
  run: string;
}

/** Write text as temporary file, flush to disk, rename over the target: the target is whole or absent. */
export function writeAtomic(path: string, text: string): void {
  const tmp = temporaryPath(path);
  const fd = openSync(tmp, 'w');
  try {
    writeSync(fd, text);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
  renameSync(tmp, path);
}

function sha256(text: string): string {
  return createHash('sha256').update(text).digest('hex');
}

function countLines(text: string): number {
  let n = 0;
  for (let i = text.indexOf('\n'); i >= 0; i = text.indexOf('\n', i + 1)) n++;
  return n;
}

/** Write one batch and then its check (a batch without a valid check is recomputed). */
export function writeBatch(folder: string, batch: Pick<Batch, 'scenario' | 'batch'>, csv: string, stamp: BatchStamp = { study: '', run: '' }): void {
  const name = batchFileName(batch);
  writeAtomic(batchPath(folder, name), csv);
  const check: BatchCheck = { format: 'quadrat-batch-check/1', rows: countLines(csv), sha256: sha256(csv), study: stamp.study, run: stamp.run };
  writeAtomic(batchCheckPath(folder, name), JSON.stringify(check));
}

/** A batch's text when it passes its check, else why not. `study` '' accepts any study. */
export function readCheckedBatch(folder: string, name: string, study = ''): { text: string } | { problem: string } {
  let check: BatchCheck;
  try {
    check = JSON.parse(readFileSync(batchCheckPath(folder, name), 'utf8')) as BatchCheck;
  } catch {
    return { problem: 'its check file is missing or unreadable (the run stopped while writing it?)' };
  }
  let text: string;
  try {
    text = readFileSync(batchPath(folder, name), 'utf8');
  } catch {
    return { problem: 'the batch file is missing or unreadable' };
  }
  if (study && check.study !== study) return { problem: `it was written by another study (${check.study || 'unknown'}), not this one (${study})` };
  const rows = countLines(text);
  if (rows !== check.rows) return { problem: `it has ${rows} rows where ${check.rows} were written` };
  if (sha256(text) !== check.sha256) return { problem: 'its content differs from what was written (checksum mismatch)' };
  return { text };
}

/** Names of the batch files present (checked or not). */
function batchNames(folder: string): string[] {
  const dir = batchesFolder(folder);
  return existsSync(dir) ? readdirSync(dir).filter(isBatchFile) : [];
}

/** Batches that pass their check, and those that do not with the reason. */
export function checkBatches(folder: string, study = ''): { good: Set<string>; bad: { name: string; problem: string }[] } {
  const good = new Set<string>();
  const bad: { name: string; problem: string }[] = [];
  for (const name of batchNames(folder)) {
    const r = readCheckedBatch(folder, name, study);
    if ('text' in r) good.add(name);
    else bad.push({ name, problem: r.problem });
  }
  return { good, bad };
}

/** File names of finished batches that pass their check. */
export function finishedBatches(folder: string, study = ''): Set<string> {
  return checkBatches(folder, study).good;
}

/** Remove a batch and its check (before recomputing it). */
export function removeBatch(folder: string, name: string): void {
  rmSync(batchPath(folder, name), { force: true });
  rmSync(batchCheckPath(folder, name), { force: true });
}

/** Remove temporary files left by a killed run (only while holding the folder's lock). Returns how many. */
export function removeStaleTemporaries(folder: string): number {
  let removed = 0;
  for (const dir of temporaryFolders(folder)) {
    if (!existsSync(dir)) continue;
    for (const f of readdirSync(dir)) {
      if (isTemporary(f)) {
        rmSync(join(dir, f), { force: true });
        removed++;
      }
    }
  }
  return removed;
}
