import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import {
  PROJECT_VERSION, type StudyManifest, fingerprintOf, openStudyFolder, readManifest,
} from '../../kernel-lib/study/study-folder';
import { inputError } from '../helpers/input-error';

const root = mkdtempSync(join(tmpdir(), 'quadrat-folder-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

const design = { seed: 1, factors: [{ name: 'site', levels: 4 }] };
const manifest = (replicates = 30): StudyManifest => ({
  format: 'quadrat-study/1', fingerprint: fingerprintOf(design, replicates, 25), design, replicates, batchSize: 25,
  scenarios: [{ index: 0, key: 'base', values: {} }],
});

// A study folder belongs to one study identity (DEVELOPERS.md, "Randomness and reproducibility").
describe('study identity', () => {
  it('the fingerprint changes with the design, replicates, batch size or resolved variants, and with the version', () => {
    const f = fingerprintOf(design, 30, 25);
    expect(f).toMatch(/^[0-9a-f]{16}$/);
    expect(fingerprintOf(JSON.parse(JSON.stringify(design)), 30, 25)).toBe(f);
    for (const other of [fingerprintOf({ ...design, seed: 2 }, 30, 25), fingerprintOf(design, 31, 25), fingerprintOf(design, 30, 10), fingerprintOf(design, 30, 25, [{ interval: 'wald' }])]) {
      expect(other).not.toBe(f);
    }
    expect(PROJECT_VERSION).toBe(JSON.parse(readFileSync(join(__dirname, '..', '..', 'package.json'), 'utf8')).version);
  });
});

describe('openStudyFolder and readManifest', () => {
  it('creates the folder with its manifest, reopens it for the same study and refuses another', () => {
    const folder = join(root, 'a');
    openStudyFolder(folder, manifest());
    expect(readManifest(folder)).toEqual(manifest());
    expect(() => openStudyFolder(folder, manifest())).not.toThrow();
    const e = inputError(() => openStudyFolder(folder, manifest(60)));
    expect(e.field).toBe('--out');
    expect(e.message).toMatch(/holds results of a different study/);
  });

  it('says when a folder is not a study folder', () => {
    expect(inputError(() => readManifest(join(root, 'nothing-here'))).message).toMatch(/is not a study folder \(no study\.json\)/);
  });
});
