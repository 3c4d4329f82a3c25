/**
 * A survey design compiled for fast repeated simulation: the layout, flat arrays of truth
 * terms and random-effect factors, and reusable scratch space. Built once per design.
 */
import { RESPONSE_FAMILIES, type FamilyName, type FamilyParams, type ResponseFamily } from '../family/index';
import { levelMap } from './factors';
import { buildLayout, type Layout } from './layout';
import type { SurveyDesign } from './types';

export const KIND_NORMAL = 0;
const KIND_UNIFORM = 1;
export const KIND_CATEGORICAL = 2;

/** One covariate in the form the row loop reads. All instances share one shape. */
export class CompiledCovariate {
  constructor(
    readonly name: string,
    readonly kind: number,
    /** Factor index the covariate varies by, or -1 for a new value per observation. */
    readonly variesFactor: number,
    /** normal: mean; uniform: min. */
    readonly a: number,
    /** normal: sd; uniform: max - min. */
    readonly b: number,
    /** Index of the factor the covariate has a share between (its `between` factor), or -1. */
    readonly confFactor: number,
    /** √strength and √(1 − strength). */
    readonly confWeight: number,
    readonly ownWeight: number,
    /** For a level-varying covariate with a between share: between-factor level of each own level. */
    readonly confOfLevel: Int32Array,
    /** Categorical: cumulative probabilities (last entry forced to 1) and labels. */
    readonly cumulative: Float64Array,
    readonly labels: string[],
    /** Index among numeric covariates, or text slot (after the factors) for a categorical one. */
    readonly slot: number,
    /** Per-level values (numeric) or level codes (categorical) for this replicate. */
    readonly levelValue: Float64Array,
    /** Shifts per level of the between factor for this replicate. */
    readonly shift: Float64Array,
    /** Balanced allocation of a level-varying categorical covariate: category codes to shuffle, or null. */
    readonly balancedCodes: Int32Array | null = null,
  ) {}

  /** Correlation of the between-level shifts with the factor's standardised random intercept. */
  effectCorrelation = 0;
  /** Index into the plan's random terms of the between factor, or -1 (no random intercept in truth). */
  effectTerm = -1;
}

/**
 * Category codes for balanced allocation over `units` units: round(p × units) of each category by
 * the largest-remainder method (Hamilton's apportionment), ties to the earlier category.
 */
export function balancedAllocation(probabilities: readonly number[], units: number): Int32Array {
  const exact = probabilities.map((p) => p * units);
  const counts = exact.map(Math.floor);
  let left = units - counts.reduce((a, b) => a + b, 0);
  const order = exact.map((e, j) => ({ j, r: e - Math.floor(e) })).sort((a, b) => b.r - a.r || a.j - b.j);
  for (let i = 0; left > 0; i++, left--) counts[order[i % order.length].j]++;
  const codes = new Int32Array(units);
  let at = 0;
  counts.forEach((c, j) => { for (let i = 0; i < c; i++) codes[at++] = j; });
  return codes;
}

export interface CompiledRandom {
  factor: string;
  factorIndex: number;
  terms: string[];
  k: number;
  levels: number;
  cholesky: Float64Array;
  /** Numeric scratch slot of each slope covariate (index j-1 for term j ≥ 1). */
  slopeSlots: Int32Array;
}

export interface SimulationPlan {
  design: SurveyDesign;
  layout: Layout;
  factorNames: string[];
  factorLabels: string[][];
  covariates: CompiledCovariate[];
  numericCount: number;
  /** Text slots: factors first (slot = factor index), then categorical covariates. */
  textCount: number;
  intercept: number;
  /** Truth terms other than the intercept, flattened: term t has parts termStart[t]..termStart[t+1]-1. */
  termValue: Float64Array;
  termStart: Int32Array;
  /** 0: numeric slot; 1: text slot equals partLevel. */
  partKind: Uint8Array;
  partSlot: Int32Array;
  partLevel: Int32Array;
  random: CompiledRandom[];
  family: ResponseFamily;
  familyParams: FamilyParams;
  /** Trials per observation (binomial; 1 otherwise); with a trials range, its maximum. */
  trials: number;
  /** Trials range drawn per observation (both equal `trials` without a range), and its numeric slot (−1: none). */
  trialsMin: number;
  trialsMax: number;
  trialsSlot: number;
  /** Numeric slot of the offset covariate added to the linear predictor (−1: none). */
  offsetSlot: number;
}

export function compilePlan(design: SurveyDesign): SimulationPlan {
  const layout = buildLayout(design.factors, design.perCell, design.unequal);
  const factorIndex = new Map(design.factors.map((f, i) => [f.name, i]));
  const numericSlot = new Map<string, number>();
  const textSlot = new Map<string, number>(design.factors.map((f, i) => [f.name, i]));
  const textLevels = new Map<string, string[]>(design.factors.map((f) => [f.name, f.labels]));
  let numericCount = 0;
  let textCount = design.factors.length;

  const covariates = design.covariates.map((c) => {
    const varies = c.varies === 'observation' ? -1 : factorIndex.get(c.varies)!;
    const ownLevels = varies < 0 ? 0 : design.factors[varies].totalLevels;
    let slot: number;
    if (c.kind === 'categorical') {
      slot = textCount++;
      textSlot.set(c.name, slot);
      textLevels.set(c.name, c.levels);
      const cumulative = new Float64Array(c.levels.length);
      let acc = 0;
      c.probabilities.forEach((p, j) => {
        acc += p;
        cumulative[j] = acc;
      });
      cumulative[cumulative.length - 1] = 1; // guard against rounding so every draw lands in a category
      const balanced = c.allocation === 'balanced' && ownLevels > 0 ? balancedAllocation(c.probabilities, ownLevels) : null;
      return new CompiledCovariate(c.name, KIND_CATEGORICAL, varies, 0, 0, -1, 0, 1, new Int32Array(0), cumulative, c.levels, slot, new Float64Array(ownLevels), new Float64Array(0), balanced);
    }
    slot = numericCount++;
    numericSlot.set(c.name, slot);
    if (c.kind === 'uniform') {
      return new CompiledCovariate(c.name, KIND_UNIFORM, varies, c.min, c.max - c.min, -1, 0, 1, new Int32Array(0), new Float64Array(0), [], slot, new Float64Array(ownLevels), new Float64Array(0));
    }
    const conf = c.between;
    const confFactor = conf === undefined ? -1 : factorIndex.get(conf.factor)!;
    const confOfLevel = conf !== undefined && varies >= 0 ? levelMap(design.factors, c.varies, conf.factor) : new Int32Array(0);
    const shift = new Float64Array(confFactor < 0 ? 0 : design.factors[confFactor].totalLevels);
    const s = conf === undefined ? 0 : conf.share;
    const compiled = new CompiledCovariate(c.name, KIND_NORMAL, varies, c.mean, c.sd, confFactor, Math.sqrt(s), Math.sqrt(1 - s), confOfLevel, new Float64Array(0), [], slot, new Float64Array(ownLevels), shift);
    compiled.effectCorrelation = conf?.correlation ?? 0;
    return compiled;
  });

  // the drawn trials column comes after the covariates, so covariate slots do not depend on it
  const trialsSlot = design.trialsRange ? numericCount++ : -1;

  let intercept = 0;
  const others = design.truth.terms.filter((t) => {
    if (t.parts.length > 0) return true;
    intercept = t.value;
    return false;
  });
  const termValue = new Float64Array(others.length);
  const termStart = new Int32Array(others.length + 1);
  const partCount = others.reduce((n, t) => n + t.parts.length, 0);
  const partKind = new Uint8Array(partCount);
  const partSlot = new Int32Array(partCount);
  const partLevel = new Int32Array(partCount);
  let q = 0;
  others.forEach((t, i) => {
    termValue[i] = t.value;
    termStart[i] = q;
    for (const p of t.parts) {
      if (p.kind === 'numeric') {
        partKind[q] = 0;
        partSlot[q] = numericSlot.get(p.column)!;
      } else {
        partKind[q] = 1;
        partSlot[q] = textSlot.get(p.column)!;
        partLevel[q] = textLevels.get(p.column)!.indexOf(p.level);
      }
      q++;
    }
  });
  termStart[others.length] = q;

  const random = design.truth.random.map((r): CompiledRandom => {
    const fi = factorIndex.get(r.factor)!;
    return {
      factor: r.factor,
      factorIndex: fi,
      terms: r.terms,
      k: r.terms.length,
      levels: design.factors[fi].totalLevels,
      cholesky: r.cholesky,
      slopeSlots: Int32Array.from(r.terms.slice(1), (name) => numericSlot.get(name)!),
    };
  });

  for (const c of covariates) if (c.confFactor >= 0) c.effectTerm = random.findIndex((r) => r.factorIndex === c.confFactor);

  return {
    design,
    layout,
    factorNames: design.factors.map((f) => f.name),
    factorLabels: design.factors.map((f) => f.labels),
    covariates,
    numericCount,
    textCount,
    intercept,
    termValue,
    termStart,
    partKind,
    partSlot,
    partLevel,
    random,
    family: RESPONSE_FAMILIES[design.family as FamilyName]!,
    familyParams: design.truth.familyParams,
    trials: design.trials,
    trialsMin: design.trialsRange?.min ?? design.trials,
    trialsMax: design.trialsRange?.max ?? design.trials,
    trialsSlot,
    offsetSlot: design.offset === undefined ? -1 : numericSlot.get(design.offset)!,
  };
}
