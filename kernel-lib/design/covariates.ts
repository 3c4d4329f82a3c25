/** Covariates of the survey design: distributions, the unit they vary by, their share between levels of a factor. */
import { describeValue, listNames } from '../model/errors';
import { expectArray, expectNonNegative, expectNumber, expectObject, fail, rejectUnknownKeys } from '../model/option-checks';
import { expectLabel, expectName, keyPath } from './checks';
import { isNestedWithin } from './factors';
import type { BetweenSpec, ResolvedCovariate, ResolvedFactor } from './types';

const COVARIATE_KEYS = ['name', 'varies', 'normal', 'uniform', 'categories', 'between', 'allocation'];
const DISTRIBUTIONS = ['normal', 'uniform', 'categories'];
const OBSERVATION = 'observation';

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
    if (obj.confounding !== undefined) {
      fail(
        `${p}.confounding: renamed to "between" (the share of the covariate's variance between levels of a factor): ` +
          `{ "factor": "site", "share": 0.8 }; add "correlation" to correlate that part with the factor's random intercept`,
        `${p}.confounding`,
      );
    }
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
    if (obj.between !== undefined && given[0] !== 'normal') {
      fail(`${p}.between: only a normal covariate can have a share between levels of a factor`, `${p}.between`);
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
        if (obj.between !== undefined) cov.between = parseBetween(obj.between, `${p}.between`, varies, factors);
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

function parseBetween(value: unknown, path: string, varies: string, factors: readonly ResolvedFactor[]): Required<BetweenSpec> {
  const obj = expectObject(value, path);
  if (obj.strength !== undefined) fail(`${path}.strength: renamed to "share" (the share of the variance between levels)`, `${path}.strength`);
  rejectUnknownKeys(obj, ['factor', 'share', 'correlation'], path);
  const factor = expectName(obj.factor, `${path}.factor`);
  const names = factors.map((f) => f.name);
  if (!names.includes(factor)) fail(`${path}.factor: unknown factor "${factor}"; factors: ${listNames(names)}`, `${path}.factor`);
  // The shift is per level of `factor`, so each unit the covariate varies by must lie in one such level.
  if (varies !== OBSERVATION && !isNestedWithin(factors, varies, factor)) {
    fail(
      `${path}.factor: a covariate that varies by "${varies}" can only have a share between levels of a factor "${varies}" is nested within`,
      `${path}.factor`,
    );
  }
  const share = expectNumber(obj.share, `${path}.share`);
  if (share < 0 || share > 1) fail(`${path}.share: expected a number from 0 to 1, got ${share}`, `${path}.share`);
  const correlation = obj.correlation === undefined ? 0 : expectNumber(obj.correlation, `${path}.correlation`);
  if (correlation < -1 || correlation > 1) fail(`${path}.correlation: expected a number from -1 to 1, got ${correlation}`, `${path}.correlation`);
  return { factor, share, correlation };
}
