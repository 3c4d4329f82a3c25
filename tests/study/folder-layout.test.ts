import { describe, expect, it } from 'vitest';
import { basename } from 'node:path';
import {
  batchCheckPath, batchFileName, batchPath, isBatchFile, isTemporary, planValueFolder, studyFolderNameOf, temporaryPath,
} from '../../kernel-lib/study/folder-layout';
import { planBatches } from '../../kernel-lib/study/batch-plan';

describe('study folder layout', () => {
  it('batch file names sort in study order (scenario-major), so a directory listing is the assembly order', () => {
    // common practice, no source: zero-padded names sort as their numbers
    const batches = planBatches(12, 300, 25);
    const names = batches.map(batchFileName);
    expect([...names].sort()).toEqual(names);
    expect(new Set(names).size).toBe(names.length);
  });

  it('a batch, its check and their temporaries are told apart by name', () => {
    const name = batchFileName({ scenario: 3, batch: 7 });
    expect(isBatchFile(name)).toBe(true);
    expect(isBatchFile(basename(batchCheckPath('f', name)))).toBe(false);
    expect(isBatchFile(basename(temporaryPath(batchPath('f', name))))).toBe(false);
    expect(isTemporary(basename(temporaryPath(batchPath('f', name))))).toBe(true);
    expect(isTemporary(basename(temporaryPath(batchCheckPath('f', name))))).toBe(true);
    expect(isTemporary(name)).toBe(false);
  });

  it('plan value folders keep numbers readable and replace other characters', () => {
    expect(basename(planValueFolder('out', -1.25, '0123456789abcdef'))).toBe('-1.25-01234567');
    expect(basename(planValueFolder('out', 1e21, 'ffffffffffffffff'))).toBe('1e+21-ffffffff');
    expect(studyFolderNameOf('0123456789abcdef')).toBe('study-0123456789');
  });
});
