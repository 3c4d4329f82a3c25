/** Survey factors: parsing, nesting and level labels. */
import { listNames } from '../model/errors';
import { checkFactorLevels } from './size-limits';
import { expectArray, expectInteger, expectObject, fail, rejectUnknownKeys } from '../model/option-checks';
import { expectLabel, expectName } from './checks';
import type { ResolvedFactor } from './types';

const FACTOR_KEYS = ['name', 'levels', 'within', 'labels'];

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

/**
 * The labels of a factor's `levels` levels from its `labels` field (e.g. the pilot's years): the
 * first `levels` of them; when a grid asks for more levels than listed, a whole-number series with
 * a constant step (2021, 2022, 2023) is continued (2024, …), other labels are followed by the
 * factor's name and the level's number (ashpool, …, fernholt, site7, site8).
 */
export function labelsForLevels(name: string, given: readonly string[], levels: number): string[] {
  if (levels <= given.length) return given.slice(0, levels);
  const numbers = given.map((l) => (/^-?\d+$/.test(l) ? Number(l) : NaN));
  const step = given.length >= 2 ? numbers[1] - numbers[0] : 1;
  const series = step !== 0 && numbers.every((v, i) => Number.isSafeInteger(v) && (i === 0 || v - numbers[i - 1] === step));
  const out = [...given];
  const taken = new Set(given);
  if (series) {
    const width = given[0].replace('-', '').length;
    for (let v = numbers[numbers.length - 1] + step; out.length < levels; v += step) {
      out.push(v < 0 ? `-${String(-v).padStart(width, '0')}` : String(v).padStart(width, '0'));
    }
    return out;
  }
  for (let k = given.length + 1; out.length < levels; k++) {
    const label = `${name}${k}`;
    if (!taken.has(label)) out.push(label);
  }
  return out;
}

/** A `labels` field: distinct labels without the characters that structure coefficient names. */
function parseLabels(value: unknown, path: string): string[] {
  const list = expectArray(value, path);
  if (list.length === 0) fail(`${path}: expected at least one label`, path);
  const seen = new Set<string>();
  return list.map((item, i) => {
    const p = `${path}[${i}]`;
    // numbers are accepted as their text (years written as 2021)
    const text = typeof item === 'number' && Number.isFinite(item) ? String(item) : item;
    if (typeof text !== 'string') return fail(`${p}: expected a label (text or a number), got ${JSON.stringify(item) ?? typeof item}`, p);
    expectLabel(text, p);
    if (seen.has(text)) fail(`${p}: label "${text}" is listed twice`, p);
    seen.add(text);
    return text;
  });
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
      labels: obj.labels === undefined ? undefined : parseLabels(obj.labels, `${p}.labels`),
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

  specs.forEach((f, i) => {
    if (f.labels !== undefined && f.within !== undefined) {
      fail(`${path}[${i}].labels: a nested factor's levels are numbered through the survey; labels are for crossed factors only`, `${path}[${i}].labels`);
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
    const labels = f.labels === undefined ? levelLabels(f.name, totalLevels) : labelsForLevels(f.name, f.labels, f.levels);
    const resolved: ResolvedFactor = { name: f.name, levels: f.levels, totalLevels, labels };
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
