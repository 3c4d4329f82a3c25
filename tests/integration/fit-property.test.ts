/**
 * Property: whatever small table is fitted (random group counts and sizes, groups of one, constant
 * columns, constant responses), every number in the result is finite unless the fit says why:
 * a failure reason, an aliased coefficient with its reason, or an interval with a note. Bad input
 * may be refused, but only as a QuadratInputError. Project rule (DEVELOPERS.md, "Never throws for
 * numerics"); the tables come from a seeded generator, so a failure is reproducible.
 */
import { describe, expect, it } from 'vitest';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { QuadratInputError } from '../../kernel-lib/model/errors';
import type { ModelSpec } from '../../kernel-lib/model/types';
import type { FitResult } from '../../kernel-lib/fit/result';
import { testRandom } from '../helpers/simple-design';

const TABLES = 300;
const METHODS = ['satterthwaite', 'wald', 'residual-t', 'kenward-roger'];

function randomCase(seed: number): { rows: Record<string, unknown>[]; model: ModelSpec } {
  const rng = testRandom(seed);
  const pick = (n: number) => Math.floor(rng.uniform() * n);
  const groups = 1 + pick(8);
  const xConstant = rng.uniform() < 0.15;
  const habitatConstant = rng.uniform() < 0.15;
  const response = rng.uniform();
  const rows: Record<string, unknown>[] = [];
  for (let g = 0; g < groups; g++) {
    const size = rng.uniform() < 0.2 ? 1 : 1 + pick(5);
    const effect = rng.normal();
    for (let i = 0; i < size; i++) {
      const x = xConstant ? 2 : rng.normal();
      const habitat = habitatConstant ? 'dry' : rng.uniform() < 0.5 ? 'dry' : 'wet';
      const y = response < 0.05 ? 4 : response < 0.1 ? g : 3 + 0.5 * x + effect + rng.normal();
      rows.push({ site: `s${g}`, x, habitat, y });
    }
  }
  const fixed = [rng.uniform() < 0.7 ? 'x' : null, rng.uniform() < 0.5 ? 'habitat' : null].filter((t): t is string => t !== null);
  const as = rng.uniform() < 0.8 ? 'random' : 'fixed';
  return { rows, model: { response: 'y', fixed, groups: [{ factor: 'site', as }], interval: METHODS[pick(METHODS.length)] } };
}

/** Non-finite numbers of a fit that nothing in the fit explains. */
function unexplained(fit: FitResult): string[] {
  if (fit.failure) return [];
  const bad: string[] = [];
  const check = (what: string, v: number, allowInfinity = false) => {
    if (!(Number.isFinite(v) || (allowInfinity && v === Infinity))) bad.push(`${what} = ${v}`);
  };
  for (const r of fit.fixed) {
    if (r.aliased) {
      if (!fit.aliasReasons[r.term]) bad.push(`${r.term} aliased without a reason`);
      continue;
    }
    check(`${r.term}.estimate`, r.estimate);
    check(`${r.term}.se`, r.se);
    if (!r.note) {
      check(`${r.term}.lower`, r.lower);
      check(`${r.term}.upper`, r.upper);
      if (r.method !== 'profile' && r.method !== 'bootstrap') check(`${r.term}.df`, r.df, r.method === 'wald');
    }
  }
  for (const r of fit.random) check(`sd(${r.factor}:${r.term})`, r.sd);
  check('residualSd', fit.residualSd);
  check('logLik', fit.logLik);
  check('aic', fit.aic);
  return bad;
}

describe(`property: ${TABLES} random small tables`, () => {
  it('no unexplained NaN or infinite number; refusals are input errors', () => {
    const counts = { fitted: 0, failedWithReason: 0, refused: 0, noted: 0, aliased: 0 };
    const problems: string[] = [];
    for (let seed = 1; seed <= TABLES; seed++) {
      const { rows, model } = randomCase(seed * 7919);
      let fit: FitResult;
      try {
        fit = fitModel(rows, model);
      } catch (e) {
        if (!(e instanceof QuadratInputError)) problems.push(`seed ${seed}: threw ${(e as Error).name}: ${(e as Error).message}`);
        counts.refused++;
        continue;
      }
      if (fit.failure) counts.failedWithReason++;
      else counts.fitted++;
      if (fit.fixed.some((r) => r.note)) counts.noted++;
      if (fit.aliased.length) counts.aliased++;
      const bad = unexplained(fit);
      if (bad.length) problems.push(`seed ${seed} (${JSON.stringify(model)}): ${bad.join(', ')}`);
    }
    expect(problems).toEqual([]);
    // the generator reaches every branch: plain fits, reported failures, aliasing and notes
    expect(counts.fitted).toBeGreaterThan(TABLES / 2);
    expect(counts.failedWithReason).toBeGreaterThan(0);
    expect(counts.aliased).toBeGreaterThan(0);
    console.log(`property fits: ${JSON.stringify(counts)}`);
  }, 300_000);
});
