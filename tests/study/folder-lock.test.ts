import { describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { hostname, tmpdir } from 'node:os';
import { join } from 'node:path';
import { acquireFolderLock, checkWritableFolder, lockProblem, releaseFolderLock } from '../../kernel-lib/study/folder-lock';
import { runStudy } from '../../kernel-lib/study/run-study';
import { inputError } from '../helpers/input-error';

const fresh = () => mkdtempSync(join(tmpdir(), 'quadrat-lock-'));

/** A small invented survey design. */
const design = {
  seed: 3, replicates: 40,
  factors: [{ name: 'site', levels: 5 }],
  perCell: 3,
  truth: { fixed: { intercept: 2 }, sd: { site: 1, residual: 1 } },
  variants: [{ name: 'site random', model: { response: 'y', groups: [{ factor: 'site', as: 'random' }] } }],
};

/** The pid of a process that has ended (a finished child). */
function deadPid(): number {
  return spawnSync(process.execPath, ['-e', '0']).pid!;
}

describe('study folder lock', () => {
  it('a second run into a held folder is refused, naming the process', () => {
    const folder = fresh();
    expect(acquireFolderLock(folder, 'run-a')).toBe('');
    const e = inputError(() => acquireFolderLock(folder, 'run-b'));
    expect(e.message).toMatch(new RegExp(`^--out: folder ".*" is in use by another run \\(process ${process.pid}, started .*\\); wait for it to finish or choose another folder$`));
    expect(lockProblem(folder, 'run-a')).toBe('');
    releaseFolderLock(folder, 'run-b'); // not the holder: nothing happens
    expect(lockProblem(folder, 'run-a')).toBe('');
    releaseFolderLock(folder, 'run-a');
    expect(acquireFolderLock(folder, 'run-b')).toBe('');
  });

  it('a lock left by a process that is gone is replaced, saying so', () => {
    const folder = fresh();
    const pid = deadPid();
    writeFileSync(join(folder, 'study.lock'), JSON.stringify({ pid, host: hostname(), run: 'old', started: 'earlier' }));
    expect(acquireFolderLock(folder, 'new')).toBe(`replaced the lock of process ${pid}, which is no longer running`);
  });

  it('a run notices when its folder was deleted or taken over', () => {
    const folder = fresh();
    acquireFolderLock(folder, 'mine');
    writeFileSync(join(folder, 'study.lock'), JSON.stringify({ pid: 1, host: hostname(), run: 'theirs', started: 'now' }));
    expect(lockProblem(folder, 'mine')).toMatch(/was taken over by another run \(process 1\)/);
    rmSync(folder, { recursive: true });
    expect(lockProblem(folder, 'mine')).toMatch(/was removed or its lock deleted/);
  });

  it('a study whose folder is deleted and reused mid-run stops without writing into the new study', async () => {
    const folder = join(fresh(), 'study');
    let batches = 0;
    const run = runStudy(design, {
      out: folder, workers: 1, batchSize: 5,
      onProgress: (p) => {
        if (p.done > 0 && ++batches === 2) {
          // another study takes the path: folder deleted, recreated, locked by its run
          rmSync(folder, { recursive: true });
          mkdirSync(join(folder, 'batches'), { recursive: true });
          writeFileSync(join(folder, 'study.lock'), JSON.stringify({ pid: 1, host: hostname(), run: 'other', started: 'now' }));
        }
      },
    });
    await expect(run).rejects.toThrow(/was taken over by another run \(process 1\) while this run was going; nothing more is written there/);
    expect(readdirSync(join(folder, 'batches'))).toEqual([]);
  });

  it('two runs into one folder at the same time: the second is refused', async () => {
    const folder = join(fresh(), 'study');
    const first = runStudy(design, { out: folder, workers: 1, batchSize: 5 });
    await new Promise((resolve) => setTimeout(resolve, 0));
    // the first run holds the lock from before its first batch until it returns
    const second = runStudy(design, { out: folder, workers: 1, batchSize: 5 });
    const results = await Promise.allSettled([first, second]);
    const refused = results.filter((r) => r.status === 'rejected');
    expect(refused).toHaveLength(1);
    expect(String((refused[0] as PromiseRejectedResult).reason.message)).toMatch(/is in use by another run/);
    expect(existsSync(join(folder, 'study.lock'))).toBe(false);
  });
});

describe('the output folder is checked before anything runs', () => {
  it('special file systems, files and unwritable folders', () => {
    expect(inputError(() => checkWritableFolder('/proc/quadrat-study')).field).toBe('--out');
    expect(inputError(() => checkWritableFolder('/proc/self')).message).toMatch(/is on a system file system|cannot be created|not writable/);
    const file = join(fresh(), 'a-file');
    writeFileSync(file, 'x');
    expect(inputError(() => checkWritableFolder(file)).message).toMatch(/cannot be created \(EEXIST\)/);
    expect(() => checkWritableFolder(join(fresh(), 'new', 'nested'))).not.toThrow();
  });
});
