import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const ROOT = join(__dirname, '..', '..');

/** Run a script saved in the project folder, where the package name resolves to the project (Node's package self-reference). */
function runInProject(name: string, source: string) {
  const dir = mkdtempSync(join(ROOT, 'out-script-'));
  const file = join(dir, name);
  writeFileSync(file, source);
  try {
    return spawnSync(process.execPath, [file], { encoding: 'utf8', cwd: ROOT, timeout: 600_000 });
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

// Node's documented package entry rules ("exports", self-reference, CommonJS named-export
// detection for ES imports; nodejs.org/api/packages.html) — common practice, no source beyond those.
describe('the package as scripts use it', () => {
  it('ES modules and CommonJS see the same exports by the package name, every one defined', () => {
    const esm = runInProject('keys.mjs', "import * as q from 'quadrat';\nconsole.log(JSON.stringify(Object.keys(q).filter((k) => !['default', '__esModule', 'module.exports'].includes(k) && q[k] !== undefined).sort()));\n");
    expect(esm.status, esm.stderr).toBe(0);
    const cjs = runInProject('keys.cjs', "const q = require('quadrat');\nconsole.log(JSON.stringify(Object.keys(q).filter((k) => !['default', '__esModule'].includes(k) && q[k] !== undefined).sort()));\n");
    expect(cjs.status, cjs.stderr).toBe(0);
    const esmKeys = JSON.parse(esm.stdout) as string[];
    const cjsKeys = JSON.parse(cjs.stdout) as string[];
    expect(esmKeys).toEqual(cjsKeys);
    // the re-exported modules (plots, display, notebook helpers) are there at run time
    for (const name of ['fitModel', 'runStudy', 'fixedEffectsCompare', 'htmlTable', 'fixedEffectRows', 'metricsTable', 'surveyTable']) {
      expect(esmKeys, name).toContain(name);
    }
    expect(esmKeys.length).toBeGreaterThan(100);
  });

  it('the README "use it from a script" example runs and prints a coverage table', () => {
    const readme = readFileSync(join(ROOT, 'README.md'), 'utf8');
    const section = readme.slice(readme.indexOf('### Use it from a script'));
    const block = /```js\n([\s\S]*?)```/.exec(section)![1];
    const r = runInProject('fit-and-study.mjs', block);
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toContain("effect: 'grazing=ungrazed'");
    expect(r.stdout).toMatch(/scenario\s*│\s*variant\s*│\s*value\s*│\s*mcse/);
    expect(r.stdout).toContain('year fixed');
  });
});
