/**
 * Marginal tests of a main effect in a model with its interaction (kernel-lib/fit/inference/contrast-test).
 */
import { describe, expect, it } from 'vitest';
import { existsSync } from 'fs';
import { spawnSync } from 'child_process';
import { buildDesign } from '../../../kernel-lib/data/build-design';
import { fitDesign } from '../../../kernel-lib/fit/fit-design';
import { termTest } from '../../../kernel-lib/fit/inference/contrast-test';
import { parseModel } from '../../../kernel-lib/model/parse';
import type { ModelSpec } from '../../../kernel-lib/model/types';
import { testRandom } from '../../helpers/simple-design';

const mean = (v: number[]) => v.reduce((a, b) => a + b, 0) / v.length;
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

/** Invented two-way layout: grazing (3 levels) x season (4), `reps` quadrats per cell, optional blocks. */
function layout(seed: number, reps: number, drop: number[] = []) {
  const rng = testRandom(seed);
  const grazing = ['heavy', 'light', 'none'];
  const season = ['autumn', 'spring', 'summer', 'winter'];
  const rows: { g: number; s: number; r: number; y: number }[] = [];
  const blockEffect = Array.from({ length: reps }, () => 1.2 * rng.normal());
  for (let r = 0; r < reps; r++) {
    for (let g = 0; g < 3; g++) {
      for (let s = 0; s < 4; s++) {
        rows.push({ g, s, r, y: 20 + 0.9 * g - 0.5 * s + 0.6 * g * (s === 2 ? 1 : 0) + blockEffect[r] + rng.normal() });
      }
    }
  }
  const kept = rows.filter((_, i) => !drop.includes(i));
  const data = {
    cover: kept.map((x) => x.y),
    grazing: kept.map((x) => grazing[x.g]),
    season: kept.map((x) => season[x.s]),
    block: kept.map((x) => `b${x.r}`),
  };
  return { rows: kept, data };
}

/**
 * Classical two-factor ANOVA of a balanced layout from sums of squares (Montgomery, Design and
 * Analysis of Experiments, 8th ed. 2013, §5.3.2, Table 5.3; with blocks: §5.6, factorial in a
 * randomised complete block design): F_A = MS_A / MS_E.
 */
function classical(rows: { g: number; s: number; r: number; y: number }[], reps: number, blocks: boolean) {
  const a = 3, b = 4;
  const grand = mean(rows.map((x) => x.y));
  const m = (f: (x: typeof rows[number]) => boolean) => mean(rows.filter(f).map((x) => x.y));
  let ssA = 0, ssB = 0, ssAB = 0, ssBlock = 0, ssT = 0;
  for (let g = 0; g < a; g++) ssA += b * reps * (m((x) => x.g === g) - grand) ** 2;
  for (let s = 0; s < b; s++) ssB += a * reps * (m((x) => x.s === s) - grand) ** 2;
  for (let g = 0; g < a; g++) for (let s = 0; s < b; s++) {
    ssAB += reps * (m((x) => x.g === g && x.s === s) - m((x) => x.g === g) - m((x) => x.s === s) + grand) ** 2;
  }
  for (let r = 0; r < reps; r++) ssBlock += a * b * (m((x) => x.r === r) - grand) ** 2;
  for (const x of rows) ssT += (x.y - grand) ** 2;
  const ssE = ssT - ssA - ssB - ssAB - (blocks ? ssBlock : 0);
  const dfE = blocks ? (reps - 1) * (a * b - 1) : a * b * (reps - 1);
  const msE = ssE / dfE;
  return { A: ssA / (a - 1) / msE, B: ssB / (b - 1) / msE, AB: ssAB / ((a - 1) * (b - 1)) / msE, dfE, msBlock: ssBlock / (reps - 1), msE };
}

const twoWay: ModelSpec = { response: 'cover', fixed: ['grazing', 'season', 'grazing:season'] };

describe('marginal main-effect tests in a balanced two-way layout equal the classical ANOVA F', () => {
  for (const seed of [5, 11]) {
    it(`seed ${seed}, fixed effects only (OLS): F for grazing and season on (2, 24) and (3, 24) df`, () => {
      const { rows, data } = layout(seed, 3);
      const ref = classical(rows, 3, false);
      const model = parseModel(twoWay);
      const design = buildDesign(data, model);
      const fit = fitDesign(design);
      for (const [term, F, numDf] of [['grazing', ref.A, 2], ['season', ref.B, 3], ['grazing:season', ref.AB, 6]] as const) {
        const t = termTest(design, fit, term);
        expect(t.kind).toBe('marginal');
        expect(t.numDf).toBe(numDf);
        expect(rel(t.statistic, F), `${term} F`).toBeLessThan(1e-9);
        expect(rel(t.denDf, ref.dfE), `${term} df`).toBeLessThan(1e-6);
      }
      // the treatment-coded test of grazing is another hypothesis (grazing within the reference season)
      const atReference = termTest(design, fit, 'grazing', 'satterthwaite', 'reference');
      expect(atReference.kind).toBe('reference');
      expect(rel(atReference.statistic, ref.A)).toBeGreaterThan(0.01);
    });
  }

  it('in randomised blocks (block random): F and df as in the classical RCBD factorial ANOVA', () => {
    const { rows, data } = layout(7, 4);
    const ref = classical(rows, 4, true);
    expect(ref.msBlock).toBeGreaterThan(ref.msE); // precondition: the REML block variance is interior
    const model = parseModel({ ...twoWay, groups: [{ factor: 'block', as: 'random' }] });
    const design = buildDesign(data, model);
    const fit = fitDesign(design);
    for (const method of ['satterthwaite', 'kenward-roger'] as const) {
      for (const [term, F] of [['grazing', ref.A], ['season', ref.B]] as const) {
        const t = termTest(design, fit, term, method);
        // tolerance: the one-parameter REML optimum is located by Brent to ~1e-10; the df follow it
        expect(rel(t.statistic, F), `${method} ${term} F`).toBeLessThan(1e-6);
        expect(rel(t.denDf, ref.dfE), `${method} ${term} df`).toBeLessThan(1e-5);
      }
    }
  });

  it('shows the contrast and says what was tested', () => {
    const { data } = layout(5, 3);
    const design = buildDesign(data, parseModel(twoWay));
    const t = termTest(design, fitDesign(design), 'grazing');
    expect(t.contrast[0]).toBe('grazing=light + 1/4 grazing=light:season=spring + 1/4 grazing=light:season=summer + 1/4 grazing=light:season=winter');
    expect(t.description).toBe('grazing: marginal effect, averaged over the 4 levels of season (equal weights)');
    const alone = buildDesign(data, parseModel({ response: 'cover', fixed: ['grazing', 'season'] }));
    expect(termTest(alone, fitDesign(alone), 'grazing').description).toMatch(/no interaction includes it/);
  });
});

// statsmodels' anova_lm(typ=3) with sum-to-zero contrasts tests each main effect averaged over the
// other factor with equal weights, which is the marginal test, also when cells are unequal.
const PY = '/usr/bin/python3';
const havePython = existsSync(PY) && spawnSync(PY, ['-c', 'import statsmodels'], { encoding: 'utf8' }).status === 0;

describe('unbalanced layout: marginal F equals statsmodels anova_lm typ=3 with sum contrasts', () => {
  it.skipIf(!havePython && !process.env.CI)('grazing and season F after dropping 5 quadrats', () => {
    const { data } = layout(13, 3, [0, 7, 8, 20, 33]);
    const script = [
      'import json, sys, pandas as pd, statsmodels.formula.api as smf',
      'from statsmodels.stats.anova import anova_lm',
      'df = pd.DataFrame(json.load(sys.stdin))',
      'fit = smf.ols("cover ~ C(grazing, Sum) * C(season, Sum)", df).fit()',
      'a = anova_lm(fit, typ=3)',
      'print(json.dumps({"grazing": a.loc["C(grazing, Sum)", "F"], "season": a.loc["C(season, Sum)", "F"]}))',
    ].join('\n');
    const run = spawnSync(PY, ['-c', script], { input: JSON.stringify(data), encoding: 'utf8' });
    expect(run.status, run.stderr).toBe(0);
    const ref = JSON.parse(run.stdout) as { grazing: number; season: number };
    const design = buildDesign(data, parseModel(twoWay));
    const fit = fitDesign(design);
    expect(rel(termTest(design, fit, 'grazing').statistic, ref.grazing)).toBeLessThan(1e-9);
    expect(rel(termTest(design, fit, 'season').statistic, ref.season)).toBeLessThan(1e-9);
  });
});
