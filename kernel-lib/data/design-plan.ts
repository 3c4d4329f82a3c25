/**
 * A design coded once and refilled for each new data set of the same shape (a simulation study's
 * replicates): the coding plan — levels and their order, references, column names and roles, which
 * table columns feed which X block, random-term layout — comes from a first build; a refill reads
 * the values into buffers kept with the plan and writes X, y and the random terms in place.
 *
 * A refill gives exactly what buildDesign would give for the same data, or null when the data do
 * not have the plan's shape (a missing value, a level absent or unknown, a column of another kind,
 * one observation per level, ...): the caller then builds the design the ordinary way, which also
 * raises the input errors. The design object returned is the plan's own and is overwritten by the
 * next refill; its `revision` changes whenever X, n or the random terms change, so anything kept
 * per design object (the engine's cross-products) knows to rebuild, while a refill that changes
 * only y keeps them.
 */
import type { DesignMatrices, RandomTerm } from './design-matrices';
import type { ResolvedModel } from '../model/types';
import { INTERCEPT, groupMeanName, isInteraction, levelName, termColumns, termLabel } from '../model/terms';
import { columnLength, type Columns } from './columns';
import { isMissing } from './missing';
import { responseShapeWarning } from './response-shape';
import { countResponseColumns } from './count-response';
import { codeColumn, nestFactor, sortFactor, type CodedFactor } from './factor';
import {
  buildDesign, columnKinds, columnReferences, fillFixedBlock, forcedCategoricalColumns, fillGroupBlock, onePerLevelWarning, usedColumns,
  type CategoricalCoding, type Coding, type FixedBlock, type FixedGroupBlock,
} from './build-design';

/** A categorical column (or a nested grouping factor) coded by the plan's levels, in sorted order. */
interface LevelSource {
  column: string;
  /** Plain column: raw value → level code. */
  byValue: Map<unknown, number> | null;
  /** The column is categorical by inference only: a number there would change its kind. */
  textOnly: boolean;
  /** Nested factor: the outer factor, the own column's raw value → own index, (outer, own) → level code. */
  outer: LevelSource | null;
  own: Map<unknown, number> | null;
  ownCount: number;
  pairs: Map<number, number> | null;
  levels: string[];
  /** Level code per row (capacity rows). */
  codes: Int32Array;
  counts: Int32Array;
}

interface SplitStep {
  input: Float64Array;
  group: LevelSource;
  within: Float64Array;
  means: Float64Array;
  sum: Float64Array;
  count: Float64Array;
}

interface PlannedRandom {
  source: LevelSource;
  slopes: Float64Array[];
  term: RandomTerm;
}

/** Arrays exposed by the design for one row count (views on the plan's buffers). */
interface Views {
  X: Float64Array;
  y: Float64Array;
  rowIds: Int32Array;
  index: Int32Array[];
  values: Float64Array[];
}

export interface DesignPlan {
  readonly model: ResolvedModel;
  /** Largest row count a refill accepts. */
  readonly capacity: number;
  readonly p: number;
  readonly columns: string[];
  readonly numeric: Map<string, Float64Array>;
  readonly sources: LevelSource[];
  readonly splits: SplitStep[];
  readonly blocks: FixedBlock[];
  readonly groupBlocks: FixedGroupBlock[];
  readonly random: PlannedRandom[];
  /** Warnings of the design's shape (data-dependent ones are added per refill). */
  readonly warnings: string[];
  readonly scratch: Float64Array;
  readonly store: { X: Float64Array; y: Float64Array; index: Int32Array[]; values: Float64Array[] };
  readonly views: Map<number, Views>;
  readonly design: DesignMatrices;
  lastViews: Views | null;
}

/**
 * The coding plan of `model` on `data` (a first data set), or null when the design cannot be
 * refilled in place (its first data set does not pass its own refill, e.g. rows dropped for
 * missing values). `built` is buildDesign(data, model) when the caller has it already; `capacity`
 * is the largest row count later data sets may have (default: this one's).
 */
export function planDesign(data: Columns, model: ResolvedModel, built?: DesignMatrices, capacity?: number): DesignPlan | null {
  try {
    const reference = built ?? buildDesign(data, model);
    const plan = compilePlan(data, model, reference, Math.max(capacity ?? 0, reference.n));
    const check = fillDesign(plan, data);
    return check !== null && sameDesign(check, reference) ? plan : null;
  } catch {
    return null;
  }
}

function compilePlan(data: Columns, model: ResolvedModel, d0: DesignMatrices, capacity: number): DesignPlan {
  const rowIds = d0.rowIds;
  const forced = forcedCategoricalColumns(model);
  const references = columnReferences(model);
  const kindOf = columnKinds(data, rowIds, forced);
  const numeric = new Map<string, Float64Array>();
  const numericOf = (column: string): Float64Array => {
    let v = numeric.get(column);
    if (v === undefined) {
      v = new Float64Array(capacity);
      numeric.set(column, v);
    }
    return v;
  };
  const sources: LevelSource[] = [];
  const coded = new Map<string, { source: LevelSource; factor: CodedFactor }>();
  const plain = (column: string, textOnly: boolean): { source: LevelSource; factor: CodedFactor } => {
    let c = coded.get(column);
    if (c === undefined) {
      const values = data[column];
      const factor = codeColumn(values, rowIds);
      const sorted = sortFactor(factor, column);
      const byValue = new Map<unknown, number>();
      for (let r = 0; r < rowIds.length; r++) byValue.set(values[rowIds[r]], sorted.codes[r]);
      const source: LevelSource = {
        column, byValue, textOnly, outer: null, own: null, ownCount: 0, pairs: null, levels: sorted.levels,
        codes: new Int32Array(capacity), counts: new Int32Array(sorted.levels.length),
      };
      source.codes.set(sorted.codes);
      sources.push(source);
      c = { source, factor };
      coded.set(column, c);
    }
    if (textOnly) c.source.textOnly = true;
    return c;
  };
  const groupSources = new Map<string, { source: LevelSource; factor: CodedFactor }>();
  const groupSource = (name: string): { source: LevelSource; factor: CodedFactor } => {
    let c = groupSources.get(name);
    if (c === undefined) {
      const g = model.groups.find((x) => x.factor === name);
      if (g?.within === undefined) {
        c = plain(name, false);
      } else {
        const outer = groupSource(g.within);
        const values = data[name];
        const ownFactor = codeColumn(values, rowIds);
        const factor = nestFactor(outer.factor, ownFactor);
        const sorted = sortFactor(factor, name);
        const ownCount = ownFactor.parts.length;
        const own = new Map<unknown, number>();
        const pairs = new Map<number, number>();
        for (let r = 0; r < rowIds.length; r++) {
          own.set(values[rowIds[r]], ownFactor.codes[r]);
          pairs.set(outer.source.codes[r] * ownCount + ownFactor.codes[r], sorted.codes[r]);
        }
        const source: LevelSource = {
          column: name, byValue: null, textOnly: false, outer: outer.source, own, ownCount, pairs, levels: sorted.levels,
          codes: new Int32Array(capacity), counts: new Int32Array(sorted.levels.length),
        };
        source.codes.set(sorted.codes);
        sources.push(source);
        c = { source, factor };
      }
      groupSources.set(name, c);
    }
    return c;
  };
  const categorical = (column: string, source: LevelSource, reference: string | undefined, full: boolean): CategoricalCoding => {
    const ref = full ? -1 : reference === undefined ? 0 : source.levels.indexOf(reference);
    const names: string[] = [];
    source.levels.forEach((l, k) => { if (k !== ref) names.push(levelName(column, l)); });
    return { kind: 'categorical', codes: source.codes, reference: ref, names };
  };
  const codings = new Map<string, Coding>();
  const codingOf = (column: string): Coding => {
    let c = codings.get(column);
    if (c === undefined) {
      c = kindOf(column) === 'numeric'
        ? { kind: 'numeric', values: numericOf(column), names: [column] }
        : categorical(column, plain(column, !forced.has(column)).source, references.get(column), false);
      codings.set(column, c);
    }
    return c;
  };

  let p = model.intercept ? 1 : 0;
  const blocks: FixedBlock[] = [];
  const fullTerm = model.intercept ? -1 : model.fixed.findIndex((t) => !isInteraction(t) && kindOf(termLabel(t)) === 'categorical');
  model.fixed.forEach((term, i) => {
    const parts = i === fullTerm
      ? [categorical(termLabel(term), plain(termLabel(term), !forced.has(termLabel(term))).source, undefined, true)]
      : termColumns(term).map(codingOf);
    const width = parts.length === 1 ? parts[0].names.length : parts[0].names.length * parts[1].names.length;
    blocks.push({ parts, offset: p, width });
    p += width;
  });
  const splits: SplitStep[] = [];
  for (const g of model.groups) {
    for (const column of g.split ?? []) {
      const b = blocks.find((x) => x.parts.length === 1 && x.parts[0].names[0] === column)!;
      const group = groupSource(g.factor).source;
      const input = (b.parts[0] as { values: Float64Array }).values;
      const step: SplitStep = {
        input, group, within: new Float64Array(capacity), means: new Float64Array(capacity),
        sum: new Float64Array(group.levels.length), count: new Float64Array(group.levels.length),
      };
      splits.push(step);
      b.parts = [{ kind: 'numeric', values: step.within, names: [column] }];
      blocks.push({ parts: [{ kind: 'numeric', values: step.means, names: [groupMeanName(column, g.factor)] }], offset: p, width: 1 });
      p += 1;
    }
  }
  const random: PlannedRandom[] = [];
  const groupBlocks: FixedGroupBlock[] = [];
  for (const g of model.groups) {
    const source = groupSource(g.factor).source;
    const slopes = (g.slopes ?? []).map(numericOf);
    if (g.as === 'random') {
      const term: RandomTerm = {
        factor: g.factor, levels: source.levels, index: new Int32Array(0), terms: [INTERCEPT, ...(g.slopes ?? [])],
        values: new Float64Array(0), correlated: g.correlated ?? true,
      };
      random.push({ source, slopes, term });
    } else {
      const coding = categorical(g.factor, source, g.reference, false);
      groupBlocks.push({ coding, slopes, offset: p });
      p += coding.names.length * (1 + slopes.length);
    }
  }
  if (p !== d0.p) throw new Error('plan and design disagree on the columns of X');

  // the shape's warnings: the first design's, without those that depend on the data's values
  const shape = model.family === 'gaussian' ? responseShapeWarning(d0.y, model.response) : undefined;
  const dataDependent = new Set<string>();
  if (shape !== undefined) dataDependent.add(shape);
  for (const r of random) dataDependent.add(onePerLevelWarning(r.term.factor, r.term.levels.length, d0.n));
  const warnings = d0.warnings.slice(d0.droppedRows.length > 0 ? 1 : 0).filter((w) => !dataDependent.has(w));

  const store = {
    X: new Float64Array(capacity * p), y: new Float64Array(capacity),
    index: random.map(() => new Int32Array(capacity)), values: random.map((r) => new Float64Array(capacity * (1 + r.slopes.length))),
  };
  const design: DesignMatrices = {
    n: 0, p, X: store.X.subarray(0, 0), fixedNames: d0.fixedNames, roles: d0.roles, y: store.y.subarray(0, 0),
    random: random.map((r) => r.term), levelCounts: d0.levelCounts, droppedRows: [], rowIds: new Int32Array(0), warnings: [], revision: 0,
  };
  return {
    model, capacity, p, columns: usedColumns(model).map((u) => u.column), numeric, sources, splits, blocks, groupBlocks, random,
    warnings, scratch: new Float64Array(capacity * p), store, views: new Map(), design, lastViews: null,
  };
}

/** Refill the plan's design from `data`; null when the data do not have the plan's shape (then use buildDesign). */
export function fillDesign(plan: DesignPlan, data: Columns): DesignMatrices | null {
  try {
    return fill(plan, data);
  } catch {
    return null;
  }
}

function fill(plan: DesignPlan, data: Columns): DesignMatrices | null {
  const n = columnLength(data);
  const { p, model } = plan;
  if (n === 0 || n <= p || n > plan.capacity) return null;
  for (const column of plan.columns) {
    if (!Object.prototype.hasOwnProperty.call(data, column)) return null;
    const values = data[column];
    for (let r = 0; r < n; r++) if (isMissing(values[r])) return null;
  }
  for (const [column, out] of plan.numeric) if (!readNumbers(data[column], n, out)) return null;
  for (const s of plan.sources) if (!codeRows(s, data[s.column], n)) return null;
  for (const r of plan.random) if (r.term.levels.length === n) return null;
  for (const s of plan.splits) split(s, n);

  const views = viewsFor(plan, n);
  if (!readNumbers(data[model.response], n, views.y)) return null;
  const counts = countResponseColumns(data, model, views.rowIds, views.y);

  // X: built in the scratch buffer, copied where it differs
  const X = plan.scratch;
  X.fill(0, 0, n * p);
  if (model.intercept) for (let r = 0; r < n; r++) X[r * p] = 1;
  for (const b of plan.blocks) fillFixedBlock(X, p, n, b);
  for (const b of plan.groupBlocks) fillGroupBlock(X, p, n, b);
  let changed = views !== plan.lastViews;
  const target = views.X;
  for (let i = 0; i < n * p; i++) {
    if (target[i] !== X[i]) {
      target[i] = X[i];
      changed = true;
    }
  }
  plan.random.forEach((r, t) => {
    const index = views.index[t];
    const codes = r.source.codes;
    for (let i = 0; i < n; i++) {
      if (index[i] !== codes[i]) {
        index[i] = codes[i];
        changed = true;
      }
    }
    const k = 1 + r.slopes.length;
    const values = views.values[t];
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < k; j++) {
        const v = j === 0 ? 1 : r.slopes[j - 1][i];
        if (values[i * k + j] !== v) {
          values[i * k + j] = v;
          changed = true;
        }
      }
    }
  });

  const design = plan.design;
  const shape = model.family === 'gaussian' ? responseShapeWarning(views.y, model.response) : undefined;
  // the shape's warnings are shared; a response that looks like counts adds its own first
  const warnings = shape === undefined ? plan.warnings : [shape, ...plan.warnings];
  if (!sameArray(design.warnings, warnings)) design.warnings = warnings;
  if (changed) {
    design.n = n;
    design.X = views.X;
    design.y = views.y;
    design.rowIds = views.rowIds;
    plan.random.forEach((r, t) => {
      r.term.index = views.index[t];
      r.term.values = views.values[t];
    });
    design.revision = (design.revision ?? 0) + 1;
    plan.lastViews = views;
  }
  if (counts.trials !== undefined || design.trials !== undefined) design.trials = counts.trials;
  if (counts.offset !== undefined || design.offset !== undefined) design.offset = counts.offset;
  return design;
}

/** Finite numbers (or bigints) into `out`; false at the first value that is not one. */
function readNumbers(values: ArrayLike<unknown>, n: number, out: Float64Array): boolean {
  for (let r = 0; r < n; r++) {
    const v = values[r];
    const x = typeof v === 'number' ? v : typeof v === 'bigint' ? Number(v) : NaN;
    if (!Number.isFinite(x)) return false;
    out[r] = x;
  }
  return true;
}

/** Level codes of a source's rows; false when a value is unknown, of another kind, or a level is absent. */
function codeRows(s: LevelSource, values: ArrayLike<unknown>, n: number): boolean {
  const codes = s.codes;
  const counts = s.counts;
  counts.fill(0);
  if (s.byValue !== null) {
    for (let r = 0; r < n; r++) {
      const v = values[r];
      if (s.textOnly && (typeof v === 'number' || typeof v === 'bigint')) return false;
      const c = s.byValue.get(v);
      if (c === undefined) return false;
      codes[r] = c;
      counts[c]++;
    }
  } else {
    const outer = s.outer!.codes;
    for (let r = 0; r < n; r++) {
      const own = s.own!.get(values[r]);
      if (own === undefined) return false;
      const c = s.pairs!.get(outer[r] * s.ownCount + own);
      if (c === undefined) return false;
      codes[r] = c;
      counts[c]++;
    }
  }
  for (let k = 0; k < counts.length; k++) if (counts[k] === 0) return false;
  return true;
}

/** Within-between split (as buildDesign: group sums in row order). */
function split(s: SplitStep, n: number): void {
  const codes = s.group.codes;
  s.sum.fill(0);
  s.count.fill(0);
  for (let r = 0; r < n; r++) { s.sum[codes[r]] += s.input[r]; s.count[codes[r]]++; }
  for (let r = 0; r < n; r++) {
    s.means[r] = s.sum[codes[r]] / s.count[codes[r]];
    s.within[r] = s.input[r] - s.means[r];
  }
}

function viewsFor(plan: DesignPlan, n: number): Views {
  let v = plan.views.get(n);
  if (v === undefined) {
    const rowIds = new Int32Array(n);
    for (let i = 0; i < n; i++) rowIds[i] = i;
    const { store } = plan;
    v = {
      X: store.X.subarray(0, n * plan.p), y: store.y.subarray(0, n), rowIds,
      index: store.index.map((a) => a.subarray(0, n)),
      values: store.values.map((a, t) => a.subarray(0, n * (1 + plan.random[t].slopes.length))),
    };
    plan.views.set(n, v);
  }
  return v;
}

function sameArray(a: ArrayLike<unknown> | undefined, b: ArrayLike<unknown> | undefined): boolean {
  if (a === undefined || b === undefined) return a === b;
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) return false;
  return true;
}

/** Whether two designs hold the same numbers, names, roles and warnings. */
function sameDesign(a: DesignMatrices, b: DesignMatrices): boolean {
  return a.n === b.n && a.p === b.p && sameArray(a.X, b.X) && sameArray(a.y, b.y) && sameArray(a.fixedNames, b.fixedNames)
    && JSON.stringify(a.roles) === JSON.stringify(b.roles) && JSON.stringify(a.levelCounts) === JSON.stringify(b.levelCounts)
    && sameArray(a.droppedRows, b.droppedRows) && sameArray(a.rowIds, b.rowIds) && sameArray(a.warnings, b.warnings)
    && sameArray(a.trials, b.trials) && sameArray(a.offset, b.offset) && a.random.length === b.random.length
    && a.random.every((t, i) => {
      const u = b.random[i];
      return t.factor === u.factor && t.correlated === u.correlated && sameArray(t.levels, u.levels) && sameArray(t.terms, u.terms)
        && sameArray(t.index, u.index) && sameArray(t.values, u.values);
    });
}
