/**
 * From a table and a model description to the numeric design the engine fits.
 *
 * Coding rules (treatment coding; Fox 2016, Applied Regression Analysis and Generalized Linear
 * Models, 3rd ed., ch. 7):
 * - X starts with the column "intercept", then the fixed terms in model order, then the
 *   grouping factors with `as: "fixed"` in model order.
 * - With `intercept: false` there is no intercept column, and the first categorical main effect
 *   (in model order) is coded with one column per level, taking the intercept's place as in the
 *   cell-means model (Searle 1987, Linear Models for Unbalanced Data, §3.2); every other factor
 *   keeps its reduced coding, so the columns stay linearly independent.
 * - A numeric column is one column. A text column, a column listed in `categorical`, an object
 *   term, or a grouping factor used in a fixed term, is a factor: one 0/1 column per level except
 *   the reference, named `habitat=wet`. Reference: the one given, else the first level in plain
 *   code-unit string order (JavaScript `<`, so "10" sorts before "9"). Levels are found among the
 *   rows used, so a level seen only in dropped rows makes no empty column.
 * - `a:b` is the product of every column of `a` with every column of `b`, `a` outer:
 *   `x:z`, `x:habitat=wet`, `habitat=wet:season=dry`. Each factor keeps its reduced
 *   coding whatever other terms are present.
 * - A fixed grouping factor adds `site=B` columns, then for each slope `x` the columns
 *   `x:site=B`. Nested levels are labelled `outer/inner` (`plot=A/1`).
 * - A covariate in a group's `split` keeps its column name but holds the deviation from its
 *   mean per level of the group; the mean follows the fixed terms as `x_mean_site`.
 * - A random grouping factor becomes a RandomTerm (intercept, then slopes; values
 *   observation-major).
 *
 * Nesting rule: nesting is explicit only. A factor with `within` is identified by the pair
 * (outer level, own level); a factor without `within` is crossed with everything, so equal labels
 * are the same level wherever they occur. Nothing is guessed from the data: a nested design that
 * reuses labels under each outer level and a crossed design look the same in a table.
 *
 * Rank deficiency is left to the engine: no column is dropped here.
 */
import type { ColumnRole, DesignMatrices, RandomTerm } from './design-matrices';
import { QuadratInputError, listNames } from '../model/errors';
import { INTERCEPT, groupMeanName, isInteraction, levelName, productName, termColumns, termLabel } from '../model/terms';
import type { GroupSpec, ResolvedModel } from '../model/types';
import { columnLength, type Columns } from './columns';
import { inferColumnKind, numericValues, type ColumnKind } from './column-kind';
import { selectCompleteRows, type UsedColumn } from './complete-rows';
import { responseShapeWarning } from './response-shape';
import { countResponseColumns } from './count-response';
import { codeColumn, nestFactor, sortFactor, type CodedFactor, type SortedFactor } from './factor';

/** One factor of a fixed term after treatment coding. */
export interface CategoricalCoding {
  kind: 'categorical';
  codes: Int32Array;
  /** Index of the reference level (its rows get all zeros); -1 for one column per level. */
  reference: number;
  /** Names of the non-reference columns, `habitat=wet`. */
  names: string[];
}

export interface NumericCoding {
  kind: 'numeric';
  values: Float64Array;
  names: [string];
}

export type Coding = CategoricalCoding | NumericCoding;

/** A block of X columns: a main effect (one coding) or an interaction (two). */
export interface FixedBlock {
  parts: Coding[];
  offset: number;
  width: number;
}

export interface FixedGroupBlock {
  coding: CategoricalCoding;
  slopes: Float64Array[];
  offset: number;
}

/** Build X, y and the random-effects terms for `model` on `data`. Throws QuadratInputError on bad input. */
export function buildDesign(data: Columns, model: ResolvedModel): DesignMatrices {
  const nRows = columnLength(data);
  const warnings: string[] = [];
  const used = usedColumns(model);
  for (const u of used) {
    if (!Object.prototype.hasOwnProperty.call(data, u.column)) {
      throw new QuadratInputError(
        `${u.field}: column "${u.column}" not found; available columns: ${listNames(Object.keys(data))}`,
        { field: u.field, column: u.column },
      );
    }
  }
  if (nRows === 0) throw new QuadratInputError('data: the table has no rows');

  // Rows.
  const selection = selectCompleteRows(data, used, nRows, model.missing);
  const { rowIds, droppedRows } = selection;
  const n = rowIds.length;
  if (droppedRows.length > 0) {
    const noun = droppedRows.length === 1 ? 'row' : 'rows';
    warnings.push(`dropped ${droppedRows.length} ${noun} with missing values in columns: ${selection.missingColumns.join(', ')}`);
  }
  if (n === 0) {
    throw new QuadratInputError(
      `data: no complete rows left after dropping rows with missing values in columns: ${selection.missingColumns.join(', ')}`,
    );
  }

  const y = numericValues(data[model.response], rowIds, model.response, 'response column');
  if (model.family === 'gaussian') {
    const shape = responseShapeWarning(y, model.response);
    if (shape !== undefined) warnings.push(shape);
  }
  const countColumns = countResponseColumns(data, model, rowIds, y);

  // Column kinds and codings, computed once per column.
  const groupFactors = new Set(model.groups.map((g) => g.factor));
  const forcedCategorical = forcedCategoricalColumns(model);
  const references = columnReferences(model);
  const kindOf = columnKinds(data, rowIds, forcedCategorical);
  const numericCache = new Map<string, Float64Array>();
  const numeric = (column: string): Float64Array => {
    let v = numericCache.get(column);
    if (v === undefined) {
      v = numericValues(data[column], rowIds, column);
      numericCache.set(column, v);
    }
    return v;
  };
  const codingCache = new Map<string, Coding>();
  const codingOf = (column: string, field: string): Coding => {
    let c = codingCache.get(column);
    if (c === undefined) {
      c =
        kindOf(column) === 'numeric'
          ? { kind: 'numeric', values: numeric(column), names: [column] }
          : treatmentCoding(column, sortFactor(codeColumn(data[column], rowIds), column), references.get(column), field);
      codingCache.set(column, c);
    }
    return c;
  };

  // Fixed terms.
  const fixedNames: string[] = model.intercept ? [INTERCEPT] : [];
  const roles: ColumnRole[] = model.intercept ? [{ kind: 'intercept', sources: [] }] : [];
  const fixedGroups = new Set(model.groups.filter((g) => g.as === 'fixed').map((g) => g.factor));
  const blocks: FixedBlock[] = [];
  const fullTerm = model.intercept ? -1 : model.fixed.findIndex((t) => !isInteraction(t) && kindOf(termLabel(t)) === 'categorical');
  model.fixed.forEach((term, i) => {
    const field = `model.fixed[${i}]`;
    const full = i === fullTerm;
    const sources = termColumns(term);
    const parts = full ? [fullCoding(data, rowIds, termLabel(term))] : sources.map((c) => codingOf(c, field));
    const names = parts.length === 1 ? parts[0].names : productNames(parts[0].names, parts[1].names);
    blocks.push({ parts, offset: fixedNames.length, width: names.length });
    fixedNames.push(...names);
    const role = termRole(sources, parts, fixedGroups);
    for (let k = 0; k < names.length; k++) roles.push(role);
  });

  // Grouping factors.
  const within = new Set(model.groups.flatMap((g) => (g.within === undefined ? [] : [g.within])));
  const fixedMain = new Set(model.fixed.filter((t) => !isInteraction(t)).map(termLabel));
  for (const column of within) {
    if (!groupFactors.has(column) && fixedMain.has(column) && kindOf(column) === 'numeric') {
      warnings.push(
        `column "${column}" is the outer factor of a nested group but enters the fixed part as a number; ` +
          `list it in model.categorical if its values are labels`,
      );
    }
  }
  const coded = new Map<string, CodedFactor>();
  const groupCoding = (name: string): CodedFactor => {
    let f = coded.get(name);
    if (f === undefined) {
      const own = codeColumn(data[name], rowIds);
      const g = model.groups.find((x) => x.factor === name);
      f = g?.within === undefined ? own : nestFactor(groupCoding(g.within), own);
      coded.set(name, f);
    }
    return f;
  };

  // Within-between split: `x` becomes x − x̄_g and `x_mean_g` holds x̄_g (Bell and Jones 2015).
  model.groups.forEach((g, i) => {
    (g.split ?? []).forEach((column, j) => {
      const field = `model.groups[${i}].split[${j}]`;
      const b = blocks.find((x) => x.parts.length === 1 && x.parts[0].names[0] === column);
      if (b === undefined || b.parts[0].kind !== 'numeric') {
        throw new QuadratInputError(`${field}: "${column}" is not a numeric fixed term; only a numeric column can be split into its ${g.factor} mean and the deviation from it`, { field, column });
      }
      const { within, means } = splitByGroup(b.parts[0].values, groupCoding(g.factor).codes);
      b.parts = [{ kind: 'numeric', values: within, names: [column] }];
      const name = groupMeanName(column, g.factor);
      blocks.push({ parts: [{ kind: 'numeric', values: means, names: [name] }], offset: fixedNames.length, width: 1 });
      fixedNames.push(name);
    });
  });

  const levelCounts: Record<string, number> = {};
  const random: RandomTerm[] = [];
  const groupBlocks: FixedGroupBlock[] = [];
  model.groups.forEach((g, i) => {
    const field = `model.groups[${i}]`;
    const factor = sortFactor(groupCoding(g.factor), g.factor);
    const L = factor.levels.length;
    if (L < 2) {
      throw new QuadratInputError(
        `${field}.factor: grouping factor "${g.factor}" has ${L} level ("${factor.levels[0]}") in the rows used; at least 2 are needed`,
        { field: `${field}.factor`, column: g.factor },
      );
    }
    levelCounts[g.factor] = L;
    const slopes = (g.slopes ?? []).map((s, j) => slopeValues(s, g, `${field}.slopes[${j}]`, kindOf, numeric));
    for (const s of g.slopes ?? []) {
      if (!fixedMain.has(s)) {
        warnings.push(
          `group "${g.factor}": slope "${s}" varies by ${g.factor} but "${s}" is not a fixed term, so its ` +
            (g.as === 'random' ? 'mean slope is held at 0' : 'slope at the reference level is held at 0'),
        );
      }
    }
    if (g.as === 'random') {
      if (L === n) warnings.push(onePerLevelWarning(g.factor, L, n));
      random.push(randomTerm(g, factor, slopes));
    } else {
      const coding = treatmentCoding(g.factor, factor, g.reference, `${field}.reference`);
      groupBlocks.push({ coding, slopes, offset: fixedNames.length });
      fixedNames.push(...coding.names);
      const level: ColumnRole = { kind: 'factor-level', sources: [g.factor], fixedGroup: g.factor };
      for (let k = 0; k < coding.names.length; k++) roles.push(level);
      (g.slopes ?? []).forEach((s) => {
        fixedNames.push(...coding.names.map((name) => productName(s, name)));
        const slope: ColumnRole = { kind: 'interaction', sources: [s, g.factor], fixedGroup: g.factor };
        for (let k = 0; k < coding.names.length; k++) roles.push(slope);
      });
    }
  });

  const usedNames = new Set(used.map((u) => u.column));
  for (const column of model.categorical) {
    if (!usedNames.has(column)) {
      warnings.push(`model.categorical: column "${column}" is listed but not used by the model`);
    }
  }

  const p = fixedNames.length;
  rejectDuplicateNames(fixedNames);
  if (n <= p) {
    throw new QuadratInputError(
      `${n} observations but ${p} fixed-effect columns; at least ${p + 1} observations are needed to estimate the residual variance`,
    );
  }

  const X = new Float64Array(n * p);
  if (model.intercept) for (let r = 0; r < n; r++) X[r * p] = 1;
  for (const b of blocks) fillFixedBlock(X, p, n, b);
  for (const b of groupBlocks) fillGroupBlock(X, p, n, b);

  return { n, p, X, fixedNames, roles, y, random, levelCounts, droppedRows, rowIds, warnings, ...countColumns };
}

/** Columns that are factors whatever their values: listed as categorical, grouping factors, object terms. */
export function forcedCategoricalColumns(model: ResolvedModel): Set<string> {
  const forced = new Set<string>([...model.categorical, ...model.groups.map((g) => g.factor)]);
  for (const t of model.fixed) if (typeof t !== 'string') forced.add(t.column);
  return forced;
}

/** Each column's kind (forced categorical, else inferred from the rows used), found once per column. */
export function columnKinds(data: Columns, rowIds: Int32Array, forced: Set<string>): (column: string) => ColumnKind {
  const kinds = new Map<string, ColumnKind>();
  return (column) => {
    let kind = kinds.get(column);
    if (kind === undefined) {
      kind = forced.has(column) ? 'categorical' : inferColumnKind(data[column], rowIds, column);
      kinds.set(column, kind);
    }
    return kind;
  };
}

/** The warning for a random grouping factor with one observation per level. */
export function onePerLevelWarning(factor: string, levels: number, n: number): string {
  return `group "${factor}": ${levels} levels for ${n} observations (one per level); its variance cannot be told apart from the residual variance`;
}

/**
 * Copy the response of `data` at the rows of a design into `out` (allocated when absent), for
 * refitting the same design shape to a new response, as a simulation study does.
 */
export function extractResponse(data: Columns, column: string, rowIds: Int32Array, out?: Float64Array): Float64Array {
  const values = data[column];
  if (values === undefined) {
    throw new QuadratInputError(`response column "${column}" not found; available columns: ${listNames(Object.keys(data))}`, { column });
  }
  const y = numericValues(values, rowIds, column, 'response column');
  if (out === undefined) return y;
  if (out.length !== y.length) {
    throw new QuadratInputError(`response column "${column}": output buffer holds ${out.length} values, the design has ${y.length} rows`, {
      column,
    });
  }
  out.set(y);
  return out;
}

// ---------------------------------------------------------------------------------------------

/** Every column the model reads, first mention first, with the field that reads it. */
export function usedColumns(model: ResolvedModel): UsedColumn[] {
  const out: UsedColumn[] = [];
  const seen = new Set<string>();
  const add = (column: string, field: string): void => {
    if (!seen.has(column)) {
      seen.add(column);
      out.push({ column, field });
    }
  };
  add(model.response, 'model.response');
  model.fixed.forEach((t, i) => termColumns(t).forEach((c) => add(c, `model.fixed[${i}]`)));
  model.groups.forEach((g, i) => {
    add(g.factor, `model.groups[${i}].factor`);
    if (g.within !== undefined) add(g.within, `model.groups[${i}].within`);
    (g.slopes ?? []).forEach((s, j) => add(s, `model.groups[${i}].slopes[${j}]`));
  });
  return out;
}

/**
 * Reference level per column for fixed terms: an object term's reference, else the reference
 * of a fixed, non-nested grouping factor on the same column (so `x:site` matches `site=..`).
 */
export function columnReferences(model: ResolvedModel): Map<string, string> {
  const refs = new Map<string, string>();
  for (const g of model.groups) {
    if (g.as === 'fixed' && g.within === undefined && g.reference !== undefined) refs.set(g.factor, g.reference);
  }
  for (const t of model.fixed) {
    if (typeof t !== 'string' && t.reference !== undefined) refs.set(t.column, t.reference);
  }
  return refs;
}

function treatmentCoding(column: string, factor: SortedFactor, reference: string | undefined, field: string): CategoricalCoding {
  const { levels } = factor;
  if (levels.length < 2) {
    throw new QuadratInputError(
      `${field}: column "${column}" has only one level ("${levels[0]}") in the rows used; a categorical term needs at least 2`,
      { field, column },
    );
  }
  let ref = 0;
  if (reference !== undefined) {
    ref = levels.indexOf(reference);
    if (ref < 0) {
      throw new QuadratInputError(
        `${field}: reference level "${reference}" of "${column}" not found; levels: ${listNames(levels)}`,
        { field, column },
      );
    }
  }
  const names: string[] = [];
  for (let k = 0; k < levels.length; k++) if (k !== ref) names.push(levelName(column, levels[k]));
  return { kind: 'categorical', codes: factor.codes, reference: ref, names };
}

/** Each value's deviation from its group mean, and the group mean, per row. */
function splitByGroup(values: Float64Array, codes: Int32Array): { within: Float64Array; means: Float64Array } {
  let groups = 0;
  for (let r = 0; r < codes.length; r++) groups = Math.max(groups, codes[r] + 1);
  const sum = new Float64Array(groups);
  const count = new Float64Array(groups);
  for (let r = 0; r < codes.length; r++) { sum[codes[r]] += values[r]; count[codes[r]]++; }
  const within = new Float64Array(values.length);
  const means = new Float64Array(values.length);
  for (let r = 0; r < codes.length; r++) {
    means[r] = sum[codes[r]] / count[codes[r]];
    within[r] = values[r] - means[r];
  }
  return { within, means };
}

/** One 0/1 column per level, for the first categorical main effect of a model without an intercept. */
function fullCoding(data: Columns, rowIds: Int32Array, column: string): CategoricalCoding {
  const factor = sortFactor(codeColumn(data[column], rowIds), column);
  return { kind: 'categorical', codes: factor.codes, reference: -1, names: factor.levels.map((l) => levelName(column, l)) };
}

function slopeValues(
  column: string,
  g: GroupSpec,
  field: string,
  kindOf: (c: string) => ColumnKind,
  numeric: (c: string) => Float64Array,
): Float64Array {
  if (kindOf(column) !== 'numeric') {
    throw new QuadratInputError(
      `${field}: slope column "${column}" of group "${g.factor}" is categorical; a slope needs a numeric column`,
      { field, column },
    );
  }
  return numeric(column);
}

function randomTerm(g: GroupSpec, factor: SortedFactor, slopes: Float64Array[]): RandomTerm {
  const n = factor.codes.length;
  const k = 1 + slopes.length;
  const values = new Float64Array(n * k);
  for (let r = 0; r < n; r++) {
    const base = r * k;
    values[base] = 1;
    for (let s = 0; s < slopes.length; s++) values[base + 1 + s] = slopes[s][r];
  }
  return {
    factor: g.factor,
    levels: factor.levels,
    index: factor.codes,
    terms: [INTERCEPT, ...(g.slopes ?? [])],
    values,
    correlated: g.correlated ?? true,
  };
}

/** Role of the columns of one fixed term (every column of a term shares it). */
function termRole(sources: string[], parts: Coding[], fixedGroups: Set<string>): ColumnRole {
  const dummies = parts.some((c) => c.kind === 'categorical');
  const kind = !dummies ? 'covariate' : parts.length === 1 ? 'factor-level' : 'interaction';
  const fixedGroup = sources.find((c, i) => parts[i].kind === 'categorical' && fixedGroups.has(c));
  return fixedGroup === undefined ? { kind, sources } : { kind, sources, fixedGroup };
}

function productNames(left: string[], right: string[]): string[] {
  const out: string[] = [];
  for (const a of left) for (const b of right) out.push(productName(a, b));
  return out;
}

function rejectDuplicateNames(names: string[]): void {
  const seen = new Set<string>();
  for (const name of names) {
    if (seen.has(name)) {
      throw new QuadratInputError(
        `fixed-effect column "${name}" would appear twice; remove the fixed term or the grouping-factor slope that repeats it`,
      );
    }
    seen.add(name);
  }
}

/** Column within a coding for row r, or -1 at the reference level (all zeros). */
function columnIndex(c: Coding, r: number): number {
  if (c.kind === 'numeric') return 0;
  const code = c.codes[r];
  if (c.reference < 0) return code;
  return code === c.reference ? -1 : code < c.reference ? code : code - 1;
}

function entryValue(c: Coding, r: number): number {
  return c.kind === 'numeric' ? c.values[r] : 1;
}

export function fillFixedBlock(X: Float64Array, p: number, n: number, b: FixedBlock): void {
  const [a, second] = b.parts;
  if (second === undefined) {
    for (let r = 0; r < n; r++) {
      const j = columnIndex(a, r);
      if (j >= 0) X[r * p + b.offset + j] = entryValue(a, r);
    }
    return;
  }
  // Product coding: only one column of each factor is non-zero per row.
  const widthB = second.names.length;
  for (let r = 0; r < n; r++) {
    const ja = columnIndex(a, r);
    const jb = columnIndex(second, r);
    if (ja >= 0 && jb >= 0) X[r * p + b.offset + ja * widthB + jb] = entryValue(a, r) * entryValue(second, r);
  }
}

export function fillGroupBlock(X: Float64Array, p: number, n: number, b: FixedGroupBlock): void {
  const width = b.coding.names.length;
  for (let r = 0; r < n; r++) {
    const j = columnIndex(b.coding, r);
    if (j < 0) continue;
    const row = r * p + b.offset;
    X[row + j] = 1;
    for (let s = 0; s < b.slopes.length; s++) X[row + (s + 1) * width + j] = b.slopes[s][r];
  }
}
