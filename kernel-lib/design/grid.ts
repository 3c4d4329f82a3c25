/**
 * The scenario grid: every combination of the values listed in `design.grid`, each applied to
 * a copy of the design JSON and resolved again. Combinations run in the grid's key order with
 * the first key slowest (nested loops). A scenario's key ("factors.year.levels=3|truth.sd.site=0.5")
 * depends only on the grid paths, their order and the values; it seeds the streams, e.g.
 * replicateStreams(design.seed, scenario.key).stream(replicate). Top-level fields with defaults (perCell,
 * missing, response, family) can be varied even when the design leaves them out.
 */
import { QuadratInputError } from '../model/errors';
import { resolveGridPath } from './grid-path';
import { parseDesign } from './parse';
import type { GridValue, SurveyDesign } from './types';

export interface Scenario {
  key: string;
  /** Grid path -> value used. */
  values: Record<string, GridValue>;
  /** The design with these values, grid removed, resolved and validated. */
  design: SurveyDesign;
}

/** Key of a design without a grid. */
export const BASE_SCENARIO_KEY = 'base';

function keyText(text: string): string {
  return text.replace(/[\\|=]/g, (c) => `\\${c}`);
}

export function scenarioKey(values: Record<string, GridValue>, order: readonly string[]): string {
  if (order.length === 0) return BASE_SCENARIO_KEY;
  return order.map((p) => `${keyText(p)}=${keyText(String(values[p]))}`).join('|');
}

export function expandGrid(design: SurveyDesign): Scenario[] {
  const axes = design.grid;
  const paths = axes.map((a) => a.path);
  const total = axes.reduce((n, a) => n * a.values.length, 1);
  const scenarios: Scenario[] = [];
  const pick = new Array<number>(axes.length).fill(0);
  for (let s = 0; s < total; s++) {
    let rest = s;
    for (let a = axes.length - 1; a >= 0; a--) {
      pick[a] = rest % axes[a].values.length;
      rest = Math.floor(rest / axes[a].values.length);
    }
    const source = JSON.parse(JSON.stringify(design.source)) as Record<string, unknown>;
    delete source.grid;
    const values: Record<string, GridValue> = {};
    axes.forEach((axis, a) => {
      const value = axis.values[pick[a]];
      const target = resolveGridPath(source, axis.path, `design.grid[${JSON.stringify(axis.path)}]`);
      (target.container as Record<string | number, unknown>)[target.key] = value;
      values[axis.path] = value;
    });
    const key = scenarioKey(values, paths);
    let resolved: SurveyDesign;
    try {
      resolved = parseDesign(source);
    } catch (e) {
      if (e instanceof QuadratInputError) {
        throw new QuadratInputError(`scenario ${key}: ${e.message}`, e.field === undefined ? {} : { field: e.field });
      }
      throw e;
    }
    scenarios.push({ key, values, design: resolved });
  }
  return scenarios;
}
