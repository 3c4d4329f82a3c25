#!/usr/bin/env node
/**
 * Every library module with logic has a test file of its own: kernel-lib/<room>/<module>.ts is
 * tested in tests/<room>/<module>.test.ts (same folders, same name).
 *
 * A module has logic when it contains a function body: a function declaration or expression, an
 * arrow function, a method, accessor or constructor, or a class. Files that hold only types,
 * interfaces, imports, re-exports and constant data have none and need no test file.
 *
 * A module without a test file fails the check unless it is listed in EXEMPT below with a
 * one-line reason. Stale entries fail too (the module is gone, has no logic, or has its test now),
 * so the list only shrinks.
 * Usage: node scripts/check-test-mirror.js [--list]   (--list prints every module and its state)
 */
const ts = require('typescript');
const { readFileSync, existsSync } = require('node:fs');
const { listTsFiles } = require('./library-files');
const { join, relative, resolve } = require('node:path');

const ROOT = resolve(__dirname, '..');
const LIB = join(ROOT, 'kernel-lib');
const TESTS = join(ROOT, 'tests');

/** module (path below kernel-lib/, no extension) → why it has no test file of its own yet */
const EXEMPT = {
  'cli/compare-fits': 'exercised through tests/fit/comparison.test.ts (among others); own file not written yet',
  'cli/demo-command': 'exercised only indirectly; own file not written yet',
  'cli/design-command': 'exercised only indirectly; own file not written yet',
  'cli/fit-command': 'exercised only indirectly; own file not written yet',
  'cli/help': 'exercised through tests/cli/main.test.ts (among others); own file not written yet',
  'cli/study-command': 'exercised through tests/cli/plan-command.test.ts (among others); own file not written yet',
  'design/checks': 'being reworked into the shared input-checking vocabulary; own file to come with it',
  'design/realised-truth': 'exercised through tests/design/simulate.test.ts (among others); own file not written yet',
  'design/variants': 'exercised only indirectly; own file not written yet',
  'display/plan-report': 'exercised only indirectly; own file not written yet',
  'display/spec-to-svg': 'exercised only indirectly; own file not written yet',
  'display/tslab-bridge': 'exercised through tests/display/show-chart.test.ts (among others); own file not written yet',
  'display/vega-libraries': 'exercised through tests/display/show-chart.test.ts (among others); own file not written yet',
  'fit/check-fit-options': 'exercised through tests/model/option-checks.test.ts (among others); own file not written yet',
  'fit/estimate/glm-irls': 'being reworked with the count estimate steps; checked against statsmodels GLM through tests/fit/estimate/count-model.test.ts',
  'fit/estimate/laplace-general': 'being reworked with the count estimate steps; checked against a brute-force integral in tests/fit/estimate/count-model.test.ts',
  'fit/estimate/normal': 'checked through tests/fit/fit-design.test.ts (dense likelihood) and tests/integration/reference-*.test.ts (statsmodels, R fixtures); own file not written yet',
  'fit/inference/bootstrap-fit': 'exercised through tests/fit/inference/bootstrap.test.ts (among others); own file not written yet',
  'fit/inference/bootstrap-pool': 'worker pool being merged with the study pool; runs in tests/fit/inference/bootstrap.test.ts',
  'fit/inference/bootstrap-worker': 'worker-thread entry loaded by path; runs in tests/fit/inference/bootstrap.test.ts',
  'fit/inference/context': 'exercised through tests/fit/inference/profile.test.ts (among others); own file not written yet',
  'fit/inference/intervals': 'dispatch of the small-sample methods, run by every interval test (tests/fit/inference/*); own file not written yet',
  'fit/inference/kenward-roger': 'checked against the dense n×n formulas in tests/fit/inference/dense-check.test.ts; own file not written yet',
  'fit/inference/mixed-model-space': 'the (q+p)-space algebra of Kenward-Roger, checked through tests/fit/inference/dense-check.test.ts; own file not written yet',
  'fit/inference/satterthwaite': 'checked against the dense n×n formulas in tests/fit/inference/dense-check.test.ts; own file not written yet',
  'fit/inference/variance-parameters': 'checked through tests/fit/inference/dense-check.test.ts (Satterthwaite, Kenward-Roger); own file not written yet',
  'plots/layout': 'exercised only indirectly; own file not written yet',
  'plots/normal-quantile': 'exercised through tests/plots/residuals-vs-fitted.test.ts (among others); own file not written yet',
  'plots/plot-input': 'being reworked into the shared input-checking vocabulary; own file to come with it',
  'plots/residual-input': 'exercised only indirectly; own file not written yet',
  'study/batch-worker': 'worker-thread entry loaded by path; runs in tests/study/run-study.test.ts',
  'study/check-study-options': 'exercised through tests/model/option-checks.test.ts (among others); own file not written yet',
  'study/merge-shards': 'exercised through tests/study/batch-files.test.ts (among others); own file not written yet',
  'study/plan-worker': 'worker-thread entry loaded by path; runs in tests/study/plan-run.test.ts',
  'study/replicate-runner': 'being reworked for speed; exercised through tests/study/count.test.ts and tests/study/run-study.test.ts',
};


/** True when the file contains anything that runs: a function body or a class. */
function hasLogic(file) {
  const sf = ts.createSourceFile(file, readFileSync(file, 'utf8'), ts.ScriptTarget.ES2022, true);
  let found = false;
  const visit = (node) => {
    if (found) return;
    if (
      ((ts.isFunctionDeclaration(node) || ts.isMethodDeclaration(node) || ts.isConstructorDeclaration(node) ||
        ts.isGetAccessorDeclaration(node) || ts.isSetAccessorDeclaration(node)) && node.body) ||
      ts.isFunctionExpression(node) || ts.isArrowFunction(node) || ts.isClassDeclaration(node) || ts.isClassExpression(node)
    ) {
      found = true;
      return;
    }
    ts.forEachChild(node, visit);
  };
  visit(sf);
  return found;
}

const modules = listTsFiles(LIB).map((f) => relative(LIB, f).replace(/\\/g, '/').replace(/\.ts$/, '')).sort();
const withLogic = modules.filter((m) => hasLogic(join(LIB, `${m}.ts`)));
const hasTest = (m) => existsSync(join(TESTS, `${m}.test.ts`));

const problems = [];
for (const m of withLogic) {
  if (!hasTest(m) && !(m in EXEMPT)) problems.push(`kernel-lib/${m}.ts has logic but no tests/${m}.test.ts (write it, or list it in EXEMPT with a reason)`);
}
for (const [m, reason] of Object.entries(EXEMPT)) {
  if (!reason || !reason.trim()) problems.push(`EXEMPT entry ${m} gives no reason`);
  if (!modules.includes(m)) problems.push(`EXEMPT entry ${m}: no such module kernel-lib/${m}.ts (remove the entry)`);
  else if (!withLogic.includes(m)) problems.push(`EXEMPT entry ${m}: the module has no logic (remove the entry)`);
  else if (hasTest(m)) problems.push(`EXEMPT entry ${m}: tests/${m}.test.ts exists now (remove the entry)`);
}

if (process.argv.includes('--list')) {
  for (const m of modules) {
    const state = !withLogic.includes(m) ? 'no logic' : hasTest(m) ? 'tested' : m in EXEMPT ? `exempt: ${EXEMPT[m]}` : 'MISSING';
    console.log(`${m.padEnd(44)} ${state}`);
  }
}
const tested = withLogic.filter(hasTest).length;
if (problems.length) {
  for (const p of problems) console.error(p);
  process.exit(1);
}
console.log(`tests: ${withLogic.length} of ${modules.length} library modules have logic; ${tested} have their own test file, ${Object.keys(EXEMPT).length} exempt`);
