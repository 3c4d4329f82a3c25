import { describe, expect, it } from 'vitest';
import { studyFolderName } from '../../kernel-lib/notebook/study-folder-name';
import { studyFingerprint } from '../../kernel-lib/study/run-study';

/** Invented design: 6 sites, 2 years. */
const design = {
  seed: 4, replicates: 20,
  factors: [{ name: 'site', levels: 6 }, { name: 'year', levels: 2 }],
  truth: { fixed: { intercept: 1 }, sd: { site: 1, residual: 1 } },
  variants: [{ name: 'v', model: { response: 'y', groups: [{ factor: 'site', as: 'random' }] } }],
};

// The folder name is the identity runStudy checks on resume (module contract): same identity, same
// folder; any change of design or replicate count, a new folder.
describe('studyFolderName', () => {
  it('is "study-" and the first 10 hex digits of the study fingerprint', () => {
    const name = studyFolderName(design, 20);
    expect(name).toMatch(/^study-[0-9a-f]{10}$/);
    expect(name).toBe(`study-${studyFingerprint(design, { replicates: 20 }).slice(0, 10)}`);
  });

  it('stays for the same study and changes with the design or the replicate count', () => {
    expect(studyFolderName(JSON.parse(JSON.stringify(design)), 20)).toBe(studyFolderName(design, 20));
    expect(studyFolderName(design, 40)).not.toBe(studyFolderName(design, 20));
    expect(studyFolderName({ ...design, seed: 5 }, 20)).not.toBe(studyFolderName(design, 20));
  });
});
