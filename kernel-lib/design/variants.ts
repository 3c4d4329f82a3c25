/**
 * Analysis variants of a design: each is a model description (parsed by parseModel) that must
 * refer only to columns the simulated data will have. Also names the coefficients each variant
 * estimates and attaches their truth.
 */
import { describeValue, listNames } from '../model/errors';
import { parseModel } from '../model/parse';
import { INTERACTION_SEPARATOR, INTERCEPT, NESTING_SEPARATOR, groupMeanName, levelName, productName, termColumns } from '../model/terms';
import type { FixedTerm, GroupSpec, ResolvedModel } from '../model/types';
import { expectArray, expectObject, fail, rejectUnknownKeys } from '../model/option-checks';
import { allColumns, type ColumnCatalog } from './columns';
import type { Layout } from './layout';
import type { ResolvedFactor, ResolvedTruth, ResolvedVariant } from './types';

const VARIANT_KEYS = ['name', 'model'];

export interface VariantContext {
  catalog: ColumnCatalog;
  factors: readonly ResolvedFactor[];
  layout: Layout;
  truth: ResolvedTruth;
}

export function parseVariants(value: unknown, path: string, ctx: VariantContext, warnings: string[]): ResolvedVariant[] {
  const list = expectArray(value, path);
  if (list.length === 0) fail(`${path}: expected at least one analysis variant`, path);
  const seen = new Map<string, number>();
  return list.map((item, i) => {
    const p = `${path}[${i}]`;
    const obj = expectObject(item, p);
    rejectUnknownKeys(obj, VARIANT_KEYS, p);
    if (typeof obj.name !== 'string' || obj.name.trim() === '') fail(`${p}.name: expected a non-empty text, got ${describeValue(obj.name)}`, `${p}.name`);
    const name = obj.name;
    const earlier = seen.get(name);
    if (earlier !== undefined) fail(`${p}.name: duplicate variant name "${name}" (same as ${path}[${earlier}])`, `${p}.name`);
    seen.set(name, i);
    if (obj.model === undefined) fail(`${p}.model: expected a model description (required)`, `${p}.model`);
    const model = parseModel(obj.model, `${p}.model`);
    checkColumns(model, `${p}.model`, ctx.catalog);
    const levels = textLevels(model, ctx);
    checkReferences(model, `${p}.model`, levels);
    const coefficients = variantCoefficients(model, levels);
    const fixedGroups = model.groups
      .filter((g) => g.as === 'fixed')
      .map((g) => {
        const ls = levels.get(g.factor)!;
        const own = ctx.factors.find((f) => f.name === g.factor)!.labels;
        // The last part of an "outer/own" name is the factor's own (survey-wide unique) label.
        const designLevel = ls.map((name) => own.indexOf(name.split(NESTING_SEPARATOR).pop()!));
        return { factor: g.factor, levels: ls, designLevel, reference: g.reference ?? ls[0] };
      });
    return { name, model, coefficients, fixedGroups, ...attachTruth(name, p, model, coefficients, levels, ctx, warnings) };
  });
}

// ---------------------------------------------------------------------------------------------
// Columns

function checkColumns(model: ResolvedModel, path: string, cat: ColumnCatalog): void {
  const known = allColumns(cat);
  const exists = (c: string): boolean => cat.numeric.includes(c) || cat.text.has(c);
  if (model.response !== cat.response) {
    fail(`${path}.response: expected "${cat.response}" (the design's response), got ${describeValue(model.response)}`, `${path}.response`);
  }
  model.fixed.forEach((term, j) => {
    const p = typeof term === 'string' ? `${path}.fixed[${j}]` : `${path}.fixed[${j}].column`;
    for (const c of termColumns(term)) {
      if (!exists(c)) fail(`${p}: unknown column "${c}"; columns: ${listNames(known)}`, p);
    }
  });
  model.categorical.forEach((c, j) => {
    const p = `${path}.categorical[${j}]`;
    if (cat.numeric.includes(c)) fail(`${p}: "${c}" is a continuous covariate of the design and cannot be treated as categorical`, p);
    if (!exists(c)) fail(`${p}: unknown column "${c}"; columns: ${listNames(known)}`, p);
  });
  model.groups.forEach((g, j) => {
    const p = `${path}.groups[${j}]`;
    if (!cat.factors.includes(g.factor)) {
      const why = cat.numeric.includes(g.factor) ? ` ("${g.factor}" is a numeric covariate)` : '';
      fail(`${p}.factor: unknown factor "${g.factor}"${why}; factors: ${listNames(cat.factors)}`, `${p}.factor`);
    }
    if (g.within !== undefined && !cat.factors.includes(g.within)) {
      fail(`${p}.within: unknown factor "${g.within}"; factors: ${listNames(cat.factors)}`, `${p}.within`);
    }
    (g.slopes ?? []).forEach((s, k) => {
      const q = `${p}.slopes[${k}]`;
      if (!cat.numeric.includes(s)) fail(`${q}: a slope needs a numeric covariate; numeric covariates: ${listNames(cat.numeric)}`, q);
    });
  });
}

/**
 * Levels of each text column as the model sees them: sorted labels, and for a grouping factor
 * with `within`, the "outer/inner" labels (outermost first) of the combinations that occur.
 */
function textLevels(model: ResolvedModel, ctx: VariantContext): Map<string, string[]> {
  const levels = new Map(ctx.catalog.text);
  const factorIndex = new Map(ctx.factors.map((f, i) => [f.name, i]));
  const groupOf = new Map(model.groups.map((g) => [g.factor, g]));
  for (const g of model.groups) {
    if (g.within === undefined) continue;
    const chain: string[] = [g.factor];
    let outer: string | undefined = g.within;
    while (outer !== undefined) {
      chain.unshift(outer);
      outer = groupOf.get(outer)?.within;
    }
    const seen = new Set<string>();
    for (let c = 0; c < ctx.layout.cells; c++) {
      seen.add(chain.map((f) => ctx.factors[factorIndex.get(f)!].labels[ctx.layout.cellLevel[factorIndex.get(f)!][c]]).join(NESTING_SEPARATOR));
    }
    levels.set(g.factor, [...seen].sort());
  }
  return levels;
}

function checkReferences(model: ResolvedModel, path: string, levels: Map<string, string[]>): void {
  const check = (column: string, reference: string | undefined, p: string): void => {
    if (reference === undefined) return;
    const ls = levels.get(column);
    if (ls === undefined) fail(`${p}: "${column}" is numeric and has no reference level`, p);
    if (!ls.includes(reference)) fail(`${p}: "${column}" has no level "${reference}"; levels: ${listNames(ls)}`, p);
  };
  model.fixed.forEach((t, j) => {
    if (typeof t !== 'string') check(t.column, t.reference, `${path}.fixed[${j}].reference`);
  });
  model.groups.forEach((g, j) => {
    if (g.as === 'fixed') check(g.factor, g.reference, `${path}.groups[${j}].reference`);
  });
}

// ---------------------------------------------------------------------------------------------
// Coefficients

function referenceOf(column: string, model: ResolvedModel, levels: string[]): string {
  for (const t of model.fixed) if (typeof t !== 'string' && t.column === column && t.reference !== undefined) return t.reference;
  return levels[0];
}

/** Names a term's columns expand to: the name itself if numeric, `col=level` for non-reference levels if text. */
function columnNames(column: string, model: ResolvedModel, levels: Map<string, string[]>, reference?: string): string[] {
  const ls = levels.get(column);
  if (ls === undefined) return [column];
  const ref = reference ?? referenceOf(column, model, ls);
  return ls.filter((l) => l !== ref).map((l) => levelName(column, l));
}

/** Fixed-effect coefficient names in model order: intercept, fixed terms, group means of split covariates, then fixed grouping factors. */
function variantCoefficients(model: ResolvedModel, levels: Map<string, string[]>): string[] {
  const names = model.intercept ? [INTERCEPT] : [];
  // without an intercept the first categorical main effect has one coefficient per level (data/build-design)
  const full = model.intercept ? -1 : model.fixed.findIndex((t) => termColumns(t).length === 1 && levels.has(termColumns(t)[0]));
  model.fixed.forEach((term, i) => {
    const column = termColumns(term)[0];
    names.push(...(i === full ? levels.get(column)!.map((l) => levelName(column, l)) : fixedTermNames(term, model, levels)));
  });
  for (const g of model.groups) for (const c of g.split ?? []) names.push(groupMeanName(c, g.factor));
  for (const g of model.groups) if (g.as === 'fixed') names.push(...columnNames(g.factor, model, levels, g.reference));
  return names;
}

function fixedTermNames(term: FixedTerm, model: ResolvedModel, levels: Map<string, string[]>): string[] {
  if (typeof term !== 'string') return columnNames(term.column, model, levels, term.reference);
  const cols = termColumns(term);
  if (cols.length === 1) return columnNames(cols[0], model, levels);
  const out: string[] = [];
  for (const a of columnNames(cols[0], model, levels)) for (const b of columnNames(cols[1], model, levels)) out.push(productName(a, b));
  return out;
}

// ---------------------------------------------------------------------------------------------
// Truth

/**
 * Factors whose levels are functions of the levels of the grouping factors a variant enters as
 * fixed: each such factor and every factor it is nested in (through `within` in the survey design).
 */
export function absorbingFactors(factors: readonly ResolvedFactor[], fixedGroups: readonly string[]): Set<string> {
  const within = new Map(factors.map((f) => [f.name, f.within]));
  const out = new Set<string>();
  for (const g of fixedGroups) {
    for (let f: string | undefined = g; f !== undefined && !out.has(f); f = within.get(f)) out.add(f);
  }
  return out;
}

/** Order-free form of a coefficient name, as TruthTerm.canonical. */
export function canonicalName(name: string): string {
  return name === INTERCEPT ? name : name.split(':').sort().join(':');
}

function attachTruth(
  name: string,
  path: string,
  model: ResolvedModel,
  coefficients: string[],
  levels: Map<string, string[]>,
  ctx: VariantContext,
  warnings: string[],
): { truth: Record<string, number>; realised: string[] } {
  const byCanonical = new Map(ctx.truth.terms.map((t) => [t.canonical, t.value]));
  const randomTruth = new Map(ctx.truth.random.map((r) => [r.factor, r]));
  const fixedGroups = model.groups.filter((g: GroupSpec) => g.as === 'fixed');
  const fixedRandom = fixedGroups.filter((g) => randomTruth.has(g.factor)).map((g) => g.factor);
  const absorbed = absorbingFactors(ctx.factors, fixedGroups.map((g) => g.factor));
  const slopeColumns = new Set([...absorbed].flatMap((f) => randomTruth.get(f)?.terms.slice(1) ?? []));
  const dummies = new Set(fixedGroups.flatMap((g) => columnNames(g.factor, model, levels, g.reference)));
  // With a grouping factor entered as fixed, the intercept, that factor's level coefficients (and
  // products with them) and the main slopes of its random-slope covariates estimate realised
  // effects (design/realised-truth): their targets come from each replicate, not from truth.fixed.
  const isRealised = (coef: string): boolean =>
    fixedGroups.length > 0 && (coef === INTERCEPT || slopeColumns.has(coef) || coef.split(INTERACTION_SEPARATOR).some((part) => dummies.has(part)));
  // A random slope whose factor enters as fixed without an x:factor product: the variant fits one
  // common slope, the pooled within-factor slope, and ignores how the slope varies between levels.
  for (const f of fixedRandom) {
    const r = randomTruth.get(f)!;
    r.terms.slice(1).forEach((x, j) => {
      if (r.sd[j + 1] === 0) return;
      const hasProduct = coefficients.some((c) => {
        const parts = c.split(INTERACTION_SEPARATOR);
        return parts.includes(x) && parts.some((part) => dummies.has(part));
      });
      if (!hasProduct) {
        warnings.push(
          `${path} ("${name}"): "${f}" enters as fixed without a ${x}${INTERACTION_SEPARATOR}${f} product, so this variant ignores ` +
            `how the slope of ${x} varies between levels of "${f}" (truth.slopes.${f}.${x}); its ${x} coefficient is scored ` +
            `against the pooled within-${f} slope of each replicate`,
        );
      }
    });
  }

  const truth: Record<string, number> = {};
  const realised: string[] = [];
  const missing: string[] = [];
  const splitSource = new Map(model.groups.flatMap((g) => (g.split ?? []).map((c): [string, string] => [groupMeanName(c, g.factor), c])));
  for (const coef of coefficients) {
    // a split covariate's group mean carries the covariate's own slope: β x = β (x − x̄_g) + β x̄_g
    const value = byCanonical.get(canonicalName(splitSource.get(coef) ?? coef));
    truth[coef] = value ?? 0;
    if (isRealised(coef)) realised.push(coef);
    else if (value === undefined) missing.push(coef);
  }
  if (missing.length > 0) {
    warnings.push(`${path} ("${name}"): no truth for ${listNames(missing)}; taken as 0`);
  }
  // Truth uses the first sorted level as reference; a variant with another reference estimates other contrasts.
  model.fixed.forEach((t, j) => {
    if (typeof t === 'string' || t.reference === undefined) return;
    const ls = ctx.catalog.text.get(t.column);
    const usesTruth = ctx.truth.terms.some((term) => term.parts.some((p) => p.kind === 'level' && p.column === t.column));
    if (ls !== undefined && t.reference !== ls[0] && usesTruth) {
      warnings.push(
        `${path}.model.fixed[${j}].reference: truth.fixed is written against reference "${ls[0]}" of "${t.column}", ` +
          `so this variant's "${t.column}" coefficients are compared with other contrasts`,
      );
    }
  });
  return { truth, realised };
}
