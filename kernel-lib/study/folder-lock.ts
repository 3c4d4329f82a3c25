/**
 * A study folder is held by one run at a time: `study.lock` names the process, host and run. A
 * second run into the same folder is refused; a run whose lock disappeared or changed (the folder
 * was deleted and reused) stops before writing another batch there.
 */
import { hostname } from 'node:os';
import { dirname, resolve } from 'node:path';
import { existsSync, mkdirSync, readFileSync, realpathSync, rmSync, writeFileSync } from 'node:fs';
import { QuadratInputError } from '../model/errors';
import { writeAtomic } from './batch-files';
import { lockPath, writeProbePath } from './folder-layout';

interface LockContent {
  pid: number;
  host: string;
  run: string;
  started: string;
}

function readLock(folder: string): LockContent | null {
  try {
    return JSON.parse(readFileSync(lockPath(folder), 'utf8')) as LockContent;
  } catch {
    return null;
  }
}

function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Take the folder for run `run`. Returns a note when a stale lock (of a process that is gone) was
 * replaced; throws naming the holder when another live run has it.
 */
export function acquireFolderLock(folder: string, run: string): string {
  const content: LockContent = { pid: process.pid, host: hostname(), run, started: new Date().toISOString() };
  const path = lockPath(folder);
  try {
    writeFileSync(path, JSON.stringify(content), { flag: 'wx' });
    return '';
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
  }
  const held = readLock(folder);
  if (held && held.run !== run) {
    const sameHost = held.host === content.host;
    if (!sameHost || processAlive(held.pid)) {
      const where = sameHost ? `process ${held.pid}` : `process ${held.pid} on host ${held.host}`;
      const gone = sameHost ? '' : `; if that run is gone, delete ${path}`;
      throw new QuadratInputError(
        `--out: folder "${folder}" is in use by another run (${where}, started ${held.started}); wait for it to finish or choose another folder${gone}`,
        { field: '--out' },
      );
    }
  }
  writeAtomic(path, JSON.stringify(content));
  return held ? `replaced the lock of process ${held.pid}, which is no longer running` : '';
}

/** '' while `run` still holds the folder, else what happened to it. */
export function lockProblem(folder: string, run: string): string {
  const held = readLock(folder);
  if (held === null) return `the study folder "${folder}" was removed or its lock deleted while this run was going; nothing more is written there`;
  if (held.run !== run) {
    return `the study folder "${folder}" was taken over by another run (process ${held.pid}) while this run was going; nothing more is written there`;
  }
  return '';
}

/** Release the folder if `run` holds it. */
export function releaseFolderLock(folder: string, run: string): void {
  if (readLock(folder)?.run === run) rmSync(lockPath(folder), { force: true });
}

/** Kernel file systems where a study folder can only fail, late and confusingly. */
const SPECIAL_ROOTS = ['/proc', '/sys', '/dev'];

/**
 * Fail at once, before any simulation, when `folder` cannot hold a study: under /proc, /sys or
 * /dev, not a folder, or not writable (a probe file is written and removed).
 */
export function checkWritableFolder(folder: string): void {
  const refuse = (why: string) => {
    throw new QuadratInputError(`--out: cannot write the study to "${folder}": ${why}`, { field: '--out' });
  };
  // look before creating anything: a recursive mkdir under /proc does not return on some systems
  let existing = resolve(folder);
  while (!existsSync(existing) && dirname(existing) !== existing) existing = dirname(existing);
  const real = realpathSync(existing);
  if (SPECIAL_ROOTS.some((r) => real === r || real.startsWith(`${r}/`))) refuse(`${real} is on a system file system, not a place for files`);
  try {
    mkdirSync(folder, { recursive: true });
  } catch (e) {
    refuse(`the folder cannot be created (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
  const probe = writeProbePath(folder);
  try {
    writeFileSync(probe, '');
    rmSync(probe, { force: true });
  } catch (e) {
    refuse(`the folder is not writable (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
}
