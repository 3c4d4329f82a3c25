/**
 * Checks of option values shared by the JSON parsers, the command line and the library options,
 * so that `level: 2` gets the same message whichever way it arrives. Each returns the value or
 * throws a QuadratInputError naming the field.
 */
import { QuadratInputError, describeValue } from './errors';

/** An interval level strictly between 0 and 1. */
export function checkLevel(value: unknown, field: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0 || value >= 1) {
    throw new QuadratInputError(`${field}: expected a number strictly between 0 and 1 (e.g. 0.95), got ${describeValue(value)}`, { field });
  }
  return value;
}

/** One of a fixed list of texts, matched exactly (so "reml" is refused, not guessed). */
export function checkChoice<T extends string>(value: unknown, choices: readonly T[], field: string): T {
  if (typeof value === 'string' && (choices as readonly string[]).includes(value)) return value as T;
  const expected = choices.map((c) => `"${c}"`).join(' or ');
  throw new QuadratInputError(`${field}: expected ${expected}, got ${describeValue(value)}`, { field });
}

/** A whole number in [min, max]. */
export function checkWholeNumber(value: unknown, field: string, min: number, max = Number.MAX_SAFE_INTEGER): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < min || value > max) {
    const range = max === Number.MAX_SAFE_INTEGER ? `≥ ${min}` : `from ${min} to ${max}`;
    throw new QuadratInputError(`${field}: expected a whole number ${range}, got ${describeValue(value)}`, { field });
  }
  return value;
}

/** A whole number given as command-line text (the same message, with the text quoted as typed). */
export function parseWholeNumber(text: string, field: string, min: number, max = Number.MAX_SAFE_INTEGER): number {
  const v = text.trim() === '' ? NaN : Number(text);
  if (!(Number.isInteger(v) && v >= min && v <= max)) {
    const range = max === Number.MAX_SAFE_INTEGER ? `≥ ${min}` : `from ${min} to ${max}`;
    throw new QuadratInputError(`${field}: expected a whole number ${range}, got "${text}"`, { field });
  }
  return v;
}

/** A shard { index, count } with 1 ≤ index ≤ count. */
export function checkShard(value: unknown, field: string): { index: number; count: number } {
  const s = value as { index?: unknown; count?: unknown };
  if (typeof value !== 'object' || value === null) {
    throw new QuadratInputError(`${field}: expected { index, count } with 1 ≤ index ≤ count, got ${describeValue(value)}`, { field });
  }
  const count = checkWholeNumber(s.count, `${field}.count`, 1);
  const index = checkWholeNumber(s.index, `${field}.index`, 1, count);
  return { index, count };
}
