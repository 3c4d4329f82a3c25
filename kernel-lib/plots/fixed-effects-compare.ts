/** Fixed-effect estimates and intervals of several fits (analysis variants) side by side, one panel per term. */
import type { FitResult } from '../fit/result';
import { REFERENCE_COLOUR } from './theme';
import type { InlineRow, LayerPart, VegaLiteSpec } from './types';
import { layeredSpec } from './layout';
import {
  checkArray,
  checkOptionsObject,
  checkRowObject,
  describeValue,
  distinctInOrder,
  fail,
  jsonNumber,
  positiveOption,
  quoteList,
  readNumber,
  readString,
  stringOption,
  variantColour,
  variantOrder,
  variantShape,
} from './plot-input';

const BUILDER = 'fixedEffectsCompare';

/** What a variant × term cell shows when there is no estimate to draw. */
export const NOT_ESTIMABLE = 'not estimable (aliased)';
export const NO_ESTIMATE = 'no estimate';
export const NOT_IN_MODEL = 'not in this model';

export interface NamedFit {
  /** Variant name shown on the axis, e.g. 'site random'. */
  name: string;
  fit: Pick<FitResult, 'fixed'> & Partial<Pick<FitResult, 'failure'>>;
}

export interface FixedEffectsCompareOptions {
  /** Terms to show, in this order. Default: every term, in order of first appearance across the fits. */
  terms?: readonly string[];
  /** Chart title. Default: "Fixed effects by analysis variant". */
  title?: string;
  /** Width of each term's panel in pixels. Default 300. */
  width?: number;
  /** Height per variant within a panel in pixels. Default 18. */
  step?: number;
}

/**
 * One panel per fixed-effect term (each with its own x scale, since terms differ in units), one
 * line per fit: the estimate and the interval the fit reports (its own method: Wald,
 * Satterthwaite, …). Cells without an estimate are written out instead of dropped:
 * "not estimable (aliased)" for aliased terms, "no estimate" when the fit failed or gave a
 * non-finite value, "not in this model" when the fit has no such term. Colours follow the order
 * of `fits`.
 *
 * Throws on an empty list, a duplicated or empty name, a malformed fixed-effect row (naming the
 * fit, row and field) or an unknown term in `options.terms`.
 */
export function fixedEffectsCompare(fits: readonly NamedFit[], options: FixedEffectsCompareOptions = {}): VegaLiteSpec {
  checkOptionsObject(options, BUILDER);
  const titleOption = stringOption(options.title, 'title', BUILDER);
  const width = positiveOption(options.width, 'width', BUILDER, 300);
  const step = positiveOption(options.step, 'step', BUILDER, 18);
  checkArray(fits, 'fits', BUILDER);
  if (fits.length === 0) fail(BUILDER, 'fits must hold at least one { name, fit }');

  const names: string[] = [];
  const tables: Map<string, Record<string, unknown>>[] = [];
  const allTerms: string[] = [];
  fits.forEach((entry, i) => {
    checkRowObject(entry, i, BUILDER);
    const name = entry.name;
    if (typeof name !== 'string' || name === '') fail(BUILDER, `fits[${i}].name must be a non-empty string, got ${describeValue(name)}`);
    if (names.includes(name)) fail(BUILDER, `fits[${i}].name '${name}' is used twice; names must be unique`);
    names.push(name);
    const fit = entry.fit as unknown;
    if (fit === null || typeof fit !== 'object' || !Array.isArray((fit as { fixed?: unknown }).fixed)) {
      fail(BUILDER, `fits[${i}].fit ('${name}') must be a fit result with a 'fixed' array`);
    }
    tables.push(readFixedRows((fit as { fixed: unknown[] }).fixed, name));
    for (const term of tables[i].keys()) allTerms.push(term);
  });
  const known = distinctInOrder(allTerms);
  const terms = resolveTerms(options.terms, known);
  const variants = variantOrder(names, names, BUILDER);

  const values: InlineRow[] = [];
  const methods = new Set<string>();
  let aliasedCells = 0;
  terms.forEach((term) => {
    names.forEach((variant, i) => {
      const row = tables[i].get(term);
      const out: InlineRow = { term, variant, estimate: null, lower: null, upper: null, se: null, method: null, status: NOT_IN_MODEL };
      if (row !== undefined) {
        const estimate = row.estimate as number;
        if (row.aliased === true) {
          out.status = NOT_ESTIMABLE;
          aliasedCells++;
        } else if (!Number.isFinite(estimate)) {
          out.status = NO_ESTIMATE;
        } else {
          out.status = 'estimated';
          out.estimate = estimate;
          out.se = jsonNumber(row.se as number);
          const hasInterval = Number.isFinite(row.lower as number) && Number.isFinite(row.upper as number);
          out.lower = hasInterval ? (row.lower as number) : null;
          out.upper = hasInterval ? (row.upper as number) : null;
          if (typeof row.method === 'string' && row.method !== '') {
            out.method = row.method;
            if (hasInterval) methods.add(row.method);
          }
        }
      }
      values.push(out);
    });
  });

  const y = {
    field: 'variant',
    type: 'nominal' as const,
    title: null,
    sort: variants,
    scale: { domain: variants },
  };
  const colour = { ...variantColour(variants, 'Analysis variant'), legend: null };
  const xTitle = 'Estimate';
  const layers: LayerPart[] = [
    {
      name: 'intervals',
      transform: [{ filter: 'isValid(datum.lower) && isValid(datum.upper)' }],
      mark: { type: 'rule', strokeWidth: 1.5 },
      encoding: { y, x: { field: 'lower', type: 'quantitative', title: xTitle, scale: { zero: false } }, x2: { field: 'upper' }, color: colour },
    },
    {
      name: 'estimates',
      transform: [{ filter: 'isValid(datum.estimate)' }],
      mark: { type: 'point', filled: true, size: 40, opacity: 1 },
      encoding: {
        y,
        x: { field: 'estimate', type: 'quantitative', title: xTitle, scale: { zero: false } },
        color: colour,
        shape: { ...variantShape(variants, 'Analysis variant'), legend: null },
        tooltip: [
          { field: 'variant', type: 'nominal', title: 'Variant' },
          { field: 'term', type: 'nominal', title: 'Term' },
          { field: 'estimate', type: 'quantitative', title: 'Estimate', format: '.4~g' },
          { field: 'se', type: 'quantitative', title: 'SE', format: '.3~g' },
          { field: 'lower', type: 'quantitative', title: 'Lower', format: '.4~g' },
          { field: 'upper', type: 'quantitative', title: 'Upper', format: '.4~g' },
          { field: 'method', type: 'nominal', title: 'Interval' },
        ],
      },
    },
    {
      name: 'missing_estimates',
      transform: [{ filter: '!isValid(datum.estimate)' }],
      mark: { type: 'text', align: 'left', baseline: 'middle', fontStyle: 'italic', fontSize: 11, color: REFERENCE_COLOUR },
      encoding: { y, x: { value: 4 }, text: { field: 'status', type: 'nominal' } },
    },
  ];

  const methodText = methods.size > 0 ? ` (${[...methods].join(', ')})` : '';
  const subtitle = [
    `Points: estimates; bars: intervals as each fit reports them${methodText}. Each term has its own scale.`,
  ];
  if (aliasedCells > 0) {
    subtitle.push(`'${NOT_ESTIMABLE}': the term's column is a linear combination of other columns in that design.`);
  }
  return layeredSpec({
    title: titleOption ?? 'Fixed effects by analysis variant',
    subtitle,
    values,
    width,
    height: step * variants.length,
    layers,
    row: { field: 'term', title: 'Term', order: terms },
    rowLabelsAbove: true,
    independentX: true,
  });
}

function readFixedRows(rows: readonly unknown[], name: string): Map<string, Record<string, unknown>> {
  const builder = `${BUILDER} ('${name}')`;
  const table = new Map<string, Record<string, unknown>>();
  rows.forEach((row, index) => {
    checkRowObject(row, index, builder);
    const term = readString(row, 'term', index, builder);
    for (const field of ['estimate', 'se', 'lower', 'upper']) readNumber(row, field, index, builder);
    if (typeof row.aliased !== 'boolean') {
      fail(builder, `row ${index}: field 'aliased' must be true or false, got ${describeValue(row.aliased)}`);
    }
    if (table.has(term)) fail(builder, `row ${index}: term '${term}' appears twice`);
    table.set(term, row);
  });
  return table;
}

function resolveTerms(requested: unknown, known: string[]): string[] {
  if (requested === undefined) {
    if (known.length === 0) fail(BUILDER, 'the fits have no fixed-effect rows');
    return known;
  }
  if (!Array.isArray(requested) || requested.length === 0 || !requested.every((t) => typeof t === 'string')) {
    fail(BUILDER, `options.terms must be a non-empty array of term names, got ${describeValue(requested)}`);
  }
  const unknown = requested.filter((t) => !known.includes(t));
  if (unknown.length > 0) fail(BUILDER, `options.terms: unknown term(s) ${quoteList(unknown)}; terms present: ${quoteList(known)}`);
  if (new Set(requested).size !== requested.length) fail(BUILDER, `options.terms lists a term twice: ${quoteList(requested)}`);
  return [...requested];
}
