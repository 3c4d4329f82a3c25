/**
 * Input checks and small data helpers shared by the plot builders. Errors are QuadratInputError
 * naming the builder, option, row and field; option checks are those of model/option-checks.
 */
import { QuadratInputError, describeValue as describeInput } from '../model/errors';
import { expectArray, expectObject, expectPositive, expectText } from '../model/option-checks';
import { VARIANT_COLOURS, VARIANT_SHAPES } from './theme';
import type { FieldTitles } from './types';

/** A value for a message, quoted as the plot builders quote field names ('site'). */
export const describeValue = (value: unknown): string => describeInput(value, "'");

export function fail(builder: string, message: string): never {
  throw new QuadratInputError(`${builder}: ${message}`);
}

/** Run a shared check, its message prefixed with the builder's name (the field path stays the error's field). */
function inBuilder<T>(builder: string, check: () => T): T {
  try {
    return check();
  } catch (e) {
    if (e instanceof QuadratInputError) throw new QuadratInputError(`${builder}: ${e.message}`, { field: e.field });
    throw e;
  }
}

export function quoteList(values: readonly (string | number)[]): string {
  return values.map((v) => (typeof v === 'string' ? `'${v}'` : String(v))).join(', ');
}

export function checkArray(value: unknown, name: string, builder: string): asserts value is readonly unknown[] {
  inBuilder(builder, () => expectArray(value, name));
}

export function checkOptionsObject(options: unknown, builder: string): void {
  inBuilder(builder, () => expectObject(options, 'options'));
}

/** A required or optional option naming a data field: a non-empty string. */
export function checkFieldOption(value: unknown, option: string, builder: string, required: boolean): void {
  if (value === undefined && !required) return;
  inBuilder(builder, () => expectText(value, `options.${option}`, 'a non-empty field name'));
}

export function checkRowObject(row: unknown, index: number, builder: string): asserts row is Record<string, unknown> {
  if (row === null || typeof row !== 'object' || Array.isArray(row)) {
    fail(builder, `row ${index}: expected an object, got ${describeValue(row)}`);
  }
}

/** A categorical or positional key read from a row: a string or a finite number. */
export function readKey(row: Record<string, unknown>, field: string, index: number, builder: string): string | number {
  const v = row[field];
  if (typeof v === 'string' || (typeof v === 'number' && Number.isFinite(v))) return v;
  return fail(builder, `row ${index}: field '${field}' must be a string or a finite number, got ${describeValue(v)}`);
}

export function readString(row: Record<string, unknown>, field: string, index: number, builder: string): string {
  const v = row[field];
  if (typeof v !== 'string') fail(builder, `row ${index}: field '${field}' must be a string, got ${describeValue(v)}`);
  return v;
}

/** A number field that may be NaN (missing); anything else that is not a number is an error. */
export function readNumber(row: Record<string, unknown>, field: string, index: number, builder: string): number {
  const v = row[field];
  if (typeof v !== 'number') fail(builder, `row ${index}: field '${field}' must be a number, got ${describeValue(v)}`);
  return v;
}

/** JSON has no NaN or Infinity: inlined data carries null for them, which Vega treats as missing. */
export function jsonNumber(value: number): number | null {
  return Number.isFinite(value) ? value : null;
}

export function positiveOption(value: unknown, option: string, builder: string, fallback: number): number {
  return value === undefined ? fallback : inBuilder(builder, () => expectPositive(value, `options.${option}`));
}

export function stringOption(value: unknown, option: string, builder: string): string | undefined {
  if (value === undefined) return undefined;
  if (typeof value !== 'string') fail(builder, `options.${option}: expected a text, got ${describeValue(value)}`);
  return value;
}

/** Distinct values in order of first appearance. */
export function distinctInOrder<T>(values: Iterable<T>): T[] {
  return [...new Set(values)];
}

/** Axis or header order: numbers ascending, strings in order of first appearance. */
export type KeyOrder = number[] | string[];

/**
 * Keys of one field across rows, made homogeneous for Vega-Lite: numbers when every value is a
 * number, otherwise every value as a string (a field mixing 3 and 'many' becomes '3' and 'many').
 */
export function keyColumn(raw: readonly (string | number)[]): { keys: (string | number)[]; order: KeyOrder } {
  if (raw.every((v) => typeof v === 'number')) {
    const order = distinctInOrder(raw as number[]).sort((a, b) => a - b);
    return { keys: [...raw], order };
  }
  const keys = raw.map((v) => String(v));
  return { keys, order: distinctInOrder(keys) };
}

/** Deterministic, locale-independent string order. */
function codeUnitOrder(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/**
 * Order of the variants, which fixes their colours: `requested` as given, or else the names
 * present sorted, so the same set of variants keeps its colours across plots.
 */
export function variantOrder(present: readonly string[], requested: unknown, builder: string): string[] {
  let order: string[];
  if (requested === undefined) {
    order = distinctInOrder(present).sort(codeUnitOrder);
  } else {
    if (!Array.isArray(requested) || !requested.every((v) => typeof v === 'string')) {
      fail(builder, `options.variants must be an array of variant names, got ${describeValue(requested)}`);
    }
    order = requested as string[];
    if (new Set(order).size !== order.length) fail(builder, `options.variants lists a variant twice: ${quoteList(order)}`);
    const missing = distinctInOrder(present).filter((v) => !order.includes(v));
    if (missing.length > 0) {
      fail(builder, `options.variants must list every variant in the rows; missing ${quoteList(missing)}`);
    }
  }
  if (order.length > VARIANT_COLOURS.length) {
    fail(builder, `at most ${VARIANT_COLOURS.length} variants can be told apart by colour, got ${order.length}`);
  }
  return order;
}

/**
 * Colour of each variant: fixed by its position in `order` (the study's variant list), so a
 * variant keeps its colour in every chart of a study, also in charts where only some variants
 * appear. The scale lists `present` (default: every variant in `order`) in the legend.
 */
export function variantColour(order: readonly string[], title: string, present: readonly string[] = order) {
  return variantScale(order, present, title, VARIANT_COLOURS);
}

/** Point shape of each variant, fixed like its colour. */
export function variantShape(order: readonly string[], title: string, present: readonly string[] = order) {
  return variantScale(order, present, title, VARIANT_SHAPES);
}

function variantScale(order: readonly string[], present: readonly string[], title: string, range: readonly string[]) {
  const shown = order.filter((v) => present.includes(v));
  return {
    field: 'variant',
    type: 'nominal' as const,
    title,
    scale: { domain: shown, range: shown.map((v) => range[order.indexOf(v)]) },
  };
}

export function fieldTitle(field: string, titles: FieldTitles | undefined): string {
  const t = titles?.[field];
  return typeof t === 'string' ? t : field;
}

export function checkFieldTitles(value: unknown, builder: string): FieldTitles | undefined {
  if (value === undefined) return undefined;
  inBuilder(builder, () => expectObject(value, 'options.fieldTitles'));
  for (const [k, v] of Object.entries(value as FieldTitles)) {
    if (typeof v !== 'string') fail(builder, `options.fieldTitles['${k}'] must be a string, got ${describeValue(v)}`);
  }
  return value as FieldTitles;
}

export function plural(count: number, one: string, many: string): string {
  return `${count} ${count === 1 ? one : many}`;
}

/** A field reference for Vega-Lite: dots and brackets in a name are escaped so they are not read as nested access. */
export function fieldRef(field: string): string {
  return field.replace(/[.[\]\\]/g, '\\$&');
}

export function capitalise(text: string): string {
  return text.length === 0 ? text : text[0].toUpperCase() + text.slice(1);
}
