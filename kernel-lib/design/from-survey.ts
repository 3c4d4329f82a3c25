import { describeSurvey, type SurveySummary } from '../data/describe-survey';
import { toColumns, type Columns } from '../data/columns';
import { isMissing } from '../data/missing';
import { naturalOrder } from '../numeric/natural-order';
import { fitResolvedModel, type SurveyData } from '../analyse/fit-model';
import type { FitResult } from '../fit/result';
import { parseModel } from '../model/parse';
import { involvesLevelOf, termColumns } from '../model/terms';
import type { ModelSpec, ResolvedModel } from '../model/types';
import { expectLabel } from './checks';
import type { CovariateSpec, FactorSpec, SurveyDesignSpec, VariantSpec } from './types';

export interface DesignFromSurveyOptions {
  seed?: number | string;
  /** Default 1000. */
  replicates?: number;
}

export interface DerivedDesign {
  design: SurveyDesignSpec;
  /** The pilot fit whose estimates became the truth. */
  fit: FitResult;
  summary: SurveySummary;
  /** What was assumed or left out, in plain words. */
  notes: string[];
}

function mean(values: number[]): number {
  return values.reduce((a, b) => a + b, 0) / values.length;
}

function sd(values: number[]): number {
  const m = mean(values);
  return Math.sqrt(values.reduce((a, b) => a + (b - m) ** 2, 0) / Math.max(1, values.length - 1));
}

/**
 * A crossed factor's level names as the design's `labels`: the pilot's labels in natural order
 * (numbers and years by value, otherwise first appearance), or, when a label cannot name a
 * design level (it holds a character that structures coefficient names), none: see usableLabel.
 */
function pilotLabels(column: ArrayLike<unknown>): string[] {
  const seen: string[] = [];
  const known = new Set<string>();
  for (let i = 0; i < column.length; i++) {
    if (isMissing(column[i])) continue;
    const label = String(column[i]);
    if (!known.has(label)) {
      known.add(label);
      seen.push(label);
    }
  }
  return naturalOrder(seen);
}

function usableLabel(label: string): boolean {
  try {
    expectLabel(label, 'label');
    return true;
  } catch {
    return false;
  }
}

/** The grouping factor whose levels a column is constant within (the one with fewest levels), if any. */
function constantWithin(data: Columns, column: string, factors: string[]): string | null {
  let best: { factor: string; levels: number } | null = null;
  for (const f of factors) {
    const seen = new Map<string, string>();
    let constant = true;
    const col = data[column];
    const g = data[f];
    for (let i = 0; i < col.length && constant; i++) {
      if (isMissing(col[i]) || isMissing(g[i])) continue;
      const key = String(g[i]);
      const v = String(col[i]);
      const prev = seen.get(key);
      if (prev === undefined) seen.set(key, v);
      else if (prev !== v) constant = false;
    }
    if (constant && seen.size > 1 && (!best || seen.size < best.levels)) best = { factor: f, levels: seen.size };
  }
  return best?.factor ?? null;
}

/**
 * A survey design that looks like a pilot survey: its factors, their levels and nesting, the
 * observations per cell, the share of missing rows, covariates with the pilot's distributions, and as
 * truth the estimates of `model` fitted to the pilot data. Variants: the model as given, and one
 * with each random factor switched to fixed. The estimates are plausible values, not facts: vary
 * them in the design's grid.
 */
export function designFromSurvey(data: SurveyData, model: ModelSpec | ResolvedModel, options: DesignFromSurveyOptions = {}): DerivedDesign {
  const resolved = parseModel(model);
  const columns = toColumns(data as Columns);
  const groupNames = resolved.groups.map((g) => g.factor);
  const nesting: Record<string, string> = {};
  for (const g of resolved.groups) if (g.within) nesting[g.factor] = g.within;
  const summary = describeSurvey(columns, groupNames, resolved.response, nesting);
  const fit = fitResolvedModel(columns, resolved);
  const notes: string[] = [];

  const factors: FactorSpec[] = resolved.groups.map((g) => {
    if (!g.within) {
      // the pilot's own level names in their natural order (2021, 2022, … rather than year1, year2, …)
      const labels = pilotLabels(columns[g.factor]);
      if (labels.every(usableLabel)) return { name: g.factor, levels: labels.length, labels };
      notes.push(`the levels of ${g.factor} are numbered (${g.factor}1, …): some of its pilot labels hold a character that structures coefficient names ([ ] : | . / = \\)`);
      return { name: g.factor, levels: labels.length };
    }
    // a nested factor's design levels are per outer level: the mean count of own labels under each outer label
    const inner = columns[g.factor];
    const outer = columns[g.within];
    const perOuter = new Map<string, Set<string>>();
    for (let i = 0; i < inner.length; i++) {
      if (isMissing(inner[i]) || isMissing(outer[i])) continue;
      const o = String(outer[i]);
      if (!perOuter.has(o)) perOuter.set(o, new Set());
      perOuter.get(o)!.add(String(inner[i]));
    }
    const sizes = [...perOuter.values()].map((set) => set.size);
    return { name: g.factor, levels: Math.max(1, Math.round(mean(sizes))), within: g.within };
  });
  const cells = factors.reduce((prod, f) => prod * f.levels, 1);
  const perCell = Math.max(1, Math.round((summary.perCellMin + summary.perCellMax) / 2));
  const usedRows = fit.observations;
  const missing = Math.max(0, Math.min(0.9, 1 - usedRows / (cells * perCell)));
  if (!summary.balanced) notes.push(`the pilot is unbalanced (${summary.perCellMin} to ${summary.perCellMax} rows per cell); the design uses ${perCell} per cell and ${(missing * 100).toFixed(1)}% missing at random`);

  const fixedColumns = [...new Set(resolved.fixed.flatMap((t) => termColumns(t)))];
  const covariates: CovariateSpec[] = [];
  for (const c of fixedColumns) {
    const values = Array.from(columns[c]).filter((v) => !isMissing(v));
    const varies = constantWithin(columns, c, groupNames) ?? 'observation';
    const numeric = values.every((v) => typeof v === 'number') && !resolved.categorical.includes(c);
    if (numeric) {
      const nums = values as number[];
      covariates.push({ name: c, varies, normal: { mean: Number(mean(nums).toPrecision(4)), sd: Number(sd(nums).toPrecision(4)) } });
    } else {
      const counts = new Map<string, number>();
      for (const v of values) counts.set(String(v), (counts.get(String(v)) ?? 0) + 1);
      const categories: Record<string, number> = {};
      for (const [k, v] of [...counts.entries()].sort()) categories[k] = Number((v / values.length).toFixed(4));
      const total = Object.values(categories).reduce((a, b) => a + b, 0);
      const firstKey = Object.keys(categories)[0];
      categories[firstKey] = Number((categories[firstKey] + 1 - total).toFixed(4));
      covariates.push({ name: c, varies, categories, ...(varies !== 'observation' ? { allocation: 'balanced' as const } : {}) });
    }
  }

  const fixedTruth: Record<string, number> = {};
  const fixedGroups = resolved.groups.filter((g) => g.as === 'fixed').map((g) => g.factor);
  for (const r of fit.fixed) {
    if (r.aliased || fixedGroups.some((f) => involvesLevelOf(r.term, f))) continue;
    fixedTruth[r.term] = Number(r.estimate.toPrecision(4));
  }
  if (fixedGroups.length) notes.push('factors fitted as fixed in the pilot get no random variation in the design (their level effects cannot carry over to new labels)');
  const sdTruth: Record<string, number> = {};
  const slopes: Record<string, Record<string, number>> = {};
  for (const r of fit.random) {
    const value = Number(r.sd.toPrecision(4));
    if (r.factor === 'residual') sdTruth.residual = value;
    else if (r.term === 'intercept') sdTruth[r.factor] = value;
    else (slopes[r.factor] ??= {})[r.term] = value;
  }
  const correlations: Record<string, Record<string, number>> = {};
  for (const c of fit.correlations) {
    if (Number.isFinite(c.value)) (correlations[c.factor] ??= {})[`${c.terms[0]}:${c.terms[1]}`] = Number(c.value.toFixed(3));
  }
  if (fit.singular) notes.push('the pilot fit is singular: a variance is estimated at zero; consider a grid over plausible non-zero values');

  const asModel = (m: ResolvedModel): ModelSpec => ({ response: m.response, fixed: m.fixed, groups: m.groups, estimation: m.estimation, ...(m.categorical.length ? { categorical: m.categorical } : {}) });
  const variants: VariantSpec[] = [{ name: 'as in the pilot model', model: asModel(resolved) }];
  for (const g of resolved.groups) {
    if (g.as !== 'random') continue;
    variants.push({
      name: `${g.factor} fixed`,
      model: asModel({ ...resolved, groups: resolved.groups.map((h) => (h === g ? { ...h, as: 'fixed' as const, slopes: h.slopes } : h)) }),
    });
  }
  const design: SurveyDesignSpec = {
    seed: options.seed ?? 1, replicates: options.replicates ?? 1000, response: resolved.response, factors, perCell,
    ...(missing > 0 ? { missing: Number(missing.toFixed(3)) } : {}),
    covariates,
    truth: {
      fixed: fixedTruth, sd: sdTruth,
      ...(Object.keys(slopes).length ? { slopes } : {}),
      ...(Object.keys(correlations).length ? { correlations } : {}),
    },
    variants,
  };
  notes.push('truth values are the pilot estimates: plausible values for planning, not facts');
  return { design, fit, summary, notes };
}
