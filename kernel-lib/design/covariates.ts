/** Covariates of the survey design: distributions, the unit they vary by, confounding. */
import { describeValue, listNames } from '../model/errors';
import {
  expectArray,
  expectLabel,
  expectName,
  expectNonNegative,
  expectNumber,
  expectObject,
  fail,
  keyPath,
  rejectUnknownKeys,
} from './checks';
import { isNestedWithin } from './factors';
import type { ResolvedCovariate, ResolvedFactor } from './types';

const COVARIATE_KEYS = ['name', 'varies', 'normal', 'uniform', 'categories', 'confounding', 'allocation'];
const DISTRIBUTIONS = ['normal', 'uniform', 'categories'];
export const OBSERVATION = 'observation';

/** Tolerance for probabilities summing to 1 (they are then rescaled to sum to 1 exactly). */
const PROBABILITY_SUM_TOLERANCE = 1e-6;

export function parseCovariates(value: unknown, path: string, factors: readonly ResolvedFactor[]): ResolvedCovariate[] {
  if (value === undefined) return [];
  const list = expectArray(value, path);
  const factorNames = factors.map((f) => f.name);
  const seen = new Map<string, number>();
  return list.map((item, i) => {
    const p = `${path}[${i}]`;
    const obj = expectObject(item, p);
    rejectUnknownKeys(obj, COVARIATE_KEYS, p);
    const name = expectName(obj.name, `${p}.name`);
    const earlier = seen.get(name);
    if (earlier !== undefined) fail(`${p}.name: duplicate covariate "${name}" (same as ${path}[${earlier}])`, `${p}.name`);
    if (factorNames.includes(name)) fail(`${p}.name: "${name}" is already a factor name`, `${p}.name`);
    seen.set(name, i);

    if (obj.varies === undefined) fail(`${p}.varies: expected "${OBSERVATION}" or a factor name (required)`, `${p}.varies`);
    if (typeof obj.varies !== 'string' || (obj.varies !== OBSERVATION && !factorNames.includes(obj.varies))) {
      fail(`${p}.varies: expected "${OBSERVATION}" or a factor (${listNames(factorNames)}), got ${describeValue(obj.varies)}`, `${p}.varies`);
    }
    const varies = obj.varies as string;

    const given = DISTRIBUTIONS.filter((d) => obj[d] !== undefined);
    if (given.length !== 1) {
      fail(`${p}: give exactly one of normal, uniform, categories (got ${given.length === 0 ? 'none' : given.join(' and ')})`, p);
    }
    if (obj.allocation !== undefined && (given[0] !== 'categories' || (obj.allocation !== 'random' && obj.allocation !== 'balanced'))) {
      fail(`${p}.allocation: expected "random" or "balanced" with categories, got ${describeValue(obj.allocation)}${given[0] !== 'categories' ? ` with ${given[0]}` : ''}`, `${p}.allocation`);
    }
    if (obj.allocation === 'balanced' && varies === OBSERVATION) {
      fail(`${p}.allocation: "balanced" needs a covariate that varies by a factor (one category per level), not by observation`, `${p}.allocation`);
    }
    if (obj.confounding !== undefined && given[0] !== 'normal') {
      fail(`${p}.confounding: only a normal covariate can be confounded with a factor`, `${p}.confounding`);
    }
    switch (given[0]) {
      case 'normal': {
        const q = `${p}.normal`;
        const n = expectObject(obj.normal, q);
        rejectUnknownKeys(n, ['mean', 'sd'], q);
        const cov: ResolvedCovariate = {
          kind: 'normal',
          name,
          varies,
          mean: expectNumber(n.mean, `${q}.mean`),
          sd: expectNonNegative(n.sd, `${q}.sd`),
        };
        if (obj.confounding !== undefined) cov.confounding = parseConfounding(obj.confounding, `${p}.confounding`, varies, factors);
        return cov;
      }
      case 'uniform': {
        const q = `${p}.uniform`;
        const u = expectObject(obj.uniform, q);
        rejectUnknownKeys(u, ['min', 'max'], q);
        const min = expectNumber(u.min, `${q}.min`);
        const max = expectNumber(u.max, `${q}.max`);
        if (!(max > min)) fail(`${q}.max: expected a number above min (${min}), got ${max}`, `${q}.max`);
        return { kind: 'uniform', name, varies, min, max };
      }
      default:
        return {
          kind: 'categorical', name, varies, ...parseCategories(obj.categories, `${p}.categories`),
          allocation: obj.allocation === 'balanced' ? 'balanced' : 'random',
        };
    }
  });
}

function parseCategories(value: unknown, path: string): { levels: string[]; probabilities: number[] } {
  const obj = expectObject(value, path);
  // Sorted order, so the reference level and the draws do not depend on JSON key order.
  const levels = Object.keys(obj).sort();
  if (levels.length < 2) fail(`${path}: expected at least two categories, got ${levels.length}`, path);
  const raw = levels.map((l) => {
    expectLabel(l, keyPath(path, l));
    return expectNonNegative(obj[l], keyPath(path, l));
  });
  const sum = raw.reduce((a, b) => a + b, 0);
  if (Math.abs(sum - 1) > PROBABILITY_SUM_TOLERANCE) fail(`${path}: probabilities must sum to 1, they sum to ${sum}`, path);
  return { levels, probabilities: raw.map((x) => x / sum) };
}

function parseConfounding(value: unknown, path: string, varies: string, factors: readonly ResolvedFactor[]): { factor: string; strength: number } {
  const obj = expectObject(value, path);
  rejectUnknownKeys(obj, ['factor', 'strength'], path);
  const factor = expectName(obj.factor, `${path}.factor`);
  const names = factors.map((f) => f.name);
  if (!names.includes(factor)) fail(`${path}.factor: unknown factor "${factor}"; factors: ${listNames(names)}`, `${path}.factor`);
  // The shift is per level of `factor`, so each unit the covariate varies by must lie in one such level.
  if (varies !== OBSERVATION && !isNestedWithin(factors, varies, factor)) {
    fail(
      `${path}.factor: a covariate that varies by "${varies}" can only be confounded with a factor "${varies}" is nested within`,
      `${path}.factor`,
    );
  }
  const strength = expectNumber(obj.strength, `${path}.strength`);
  if (strength < 0 || strength > 1) fail(`${path}.strength: expected a number from 0 to 1, got ${strength}`, `${path}.strength`);
  return { factor, strength };
}
