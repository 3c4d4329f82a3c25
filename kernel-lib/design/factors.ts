/** Survey factors: parsing, nesting and level labels. */
import { listNames } from '../model/errors';
import { checkFactorLevels } from './size-limits';
import { expectArray, expectInteger, expectObject, fail, rejectUnknownKeys } from '../model/option-checks';
import { expectName } from './checks';
import type { ResolvedFactor } from './types';

const FACTOR_KEYS = ['name', 'levels', 'within'];

/**
 * Level labels: the factor name and a 1-based number zero-padded to the width of the largest,
 * so that sorted text order equals level order ("site01".."site12"). Nested factors are numbered
 * through the whole survey (plot01..plot24 for 4 plots in each of 6 sites), so a label names one
 * plot whether or not a model declares the nesting.
 */
export function levelLabels(name: string, count: number): string[] {
  const width = String(count).length;
  const labels = new Array<string>(count);
  for (let i = 0; i < count; i++) labels[i] = name + String(i + 1).padStart(width, '0');
  return labels;
}

export function parseFactors(value: unknown, path: string): ResolvedFactor[] {
  const list = expectArray(value, path);
  if (list.length === 0) fail(`${path}: expected at least one factor`, path);
  const specs = list.map((item, i) => {
    const p = `${path}[${i}]`;
    const obj = expectObject(item, p);
    rejectUnknownKeys(obj, FACTOR_KEYS, p);
    return {
      name: expectName(obj.name, `${p}.name`),
      levels: expectInteger(obj.levels, `${p}.levels`, 1),
      within: obj.within === undefined ? undefined : expectName(obj.within, `${p}.within`),
    };
  });

  const index = new Map<string, number>();
  specs.forEach((f, i) => {
    const earlier = index.get(f.name);
    if (earlier !== undefined) fail(`${path}[${i}].name: duplicate factor "${f.name}" (same as ${path}[${earlier}])`, `${path}[${i}].name`);
    index.set(f.name, i);
  });
  const names = specs.map((f) => f.name);
  specs.forEach((f, i) => {
    if (f.within === undefined) return;
    const p = `${path}[${i}].within`;
    if (!index.has(f.within)) fail(`${p}: unknown factor "${f.within}"; factors: ${listNames(names)}`, p);
    if (f.within === f.name) fail(`${p}: "${f.name}" cannot be nested within itself`, p);
    const seen = new Set([f.name]);
    let outer: string | undefined = f.within;
    while (outer !== undefined) {
      if (seen.has(outer)) fail(`${p}: nesting of "${f.name}" loops back through "${outer}"`, p);
      seen.add(outer);
      outer = specs[index.get(outer)!].within;
    }
  });

  const total = new Map<string, number>();
  const totalOf = (name: string): number => {
    const known = total.get(name);
    if (known !== undefined) return known;
    const f = specs[index.get(name)!];
    const t = f.within === undefined ? f.levels : f.levels * totalOf(f.within);
    total.set(name, t);
    return t;
  };
  specs.forEach((f, i) => checkFactorLevels(f.name, totalOf(f.name), `${path}[${i}].levels`));
  return specs.map((f) => {
    const totalLevels = totalOf(f.name);
    const resolved: ResolvedFactor = { name: f.name, levels: f.levels, totalLevels, labels: levelLabels(f.name, totalLevels) };
    if (f.within !== undefined) {
      resolved.within = f.within;
      // Level g of a nested factor lies in outer level floor(g / levels).
      const outerLevel = new Int32Array(totalLevels);
      for (let g = 0; g < totalLevels; g++) outerLevel[g] = Math.floor(g / f.levels);
      resolved.outerLevel = outerLevel;
    }
    return resolved;
  });
}

/** Whether `inner` is nested (directly or through other factors) within `outer`. */
export function isNestedWithin(factors: readonly ResolvedFactor[], inner: string, outer: string): boolean {
  let f = factors.find((x) => x.name === inner);
  while (f !== undefined && f.within !== undefined) {
    if (f.within === outer) return true;
    const next: string = f.within;
    f = factors.find((x) => x.name === next);
  }
  return false;
}

/** Map each level of `inner` to its level of `outer` (inner nested within outer, or equal). */
export function levelMap(factors: readonly ResolvedFactor[], inner: string, outer: string): Int32Array {
  let f = factors.find((x) => x.name === inner)!;
  const map = new Int32Array(f.totalLevels);
  for (let g = 0; g < map.length; g++) map[g] = g;
  while (f.name !== outer) {
    const up = f.outerLevel!;
    for (let g = 0; g < map.length; g++) map[g] = up[map[g]];
    const next = f.within!;
    f = factors.find((x) => x.name === next)!;
  }
  return map;
}
