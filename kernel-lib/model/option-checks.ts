/**
 * The one vocabulary of input checks: the model and design parsers, the study and plan options,
 * the library's fit options, the command line and the plot builders all check their input with
 * these, so one kind of mistake gets one message wherever it arrives. Each check returns the value
 * or throws a QuadratInputError whose message starts with the field path
 * (`design.factors[1].levels: expected a whole number ≥ 1, got 0`) and whose `field` is that path.
 */
import { QuadratInputError, describeValue, listNames } from './errors';

export type JsonObject = Record<string, unknown>;

export function fail(message: string, field: string): never {
  throw new QuadratInputError(message, { field });
}

export function isPlainObject(value: unknown): value is JsonObject {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** JSON text parsed, or an error naming the field and what the JSON parser found. */
export function parseJsonText(text: string, path: string): unknown {
  try {
    return JSON.parse(text);
  } catch (e) {
    return fail(`${path}: not valid JSON (${(e as Error).message})`, path);
  }
}

export function expectObject(value: unknown, path: string): JsonObject {
  if (!isPlainObject(value)) return fail(`${path}: expected an object, got ${describeValue(value)}`, path);
  return value;
}

export function expectArray(value: unknown, path: string): unknown[] {
  if (!Array.isArray(value)) return fail(`${path}: expected an array, got ${describeValue(value)}`, path);
  return value;
}

export function expectBoolean(value: unknown, path: string): boolean {
  if (typeof value !== 'boolean') return fail(`${path}: expected true or false, got ${describeValue(value)}`, path);
  return value;
}

/** A non-empty text; `what` names it in the message ("a column name", "a field name"). */
export function expectText(value: unknown, path: string, what = 'a non-empty text'): string {
  if (value === undefined) return fail(`${path}: expected ${what} (required)`, path);
  if (typeof value !== 'string' || value === '') return fail(`${path}: expected ${what}, got ${describeValue(value)}`, path);
  return value;
}

/** Keys of an object outside `allowed` are refused, naming the nearest allowed key when one is close (a typo). */
export function rejectUnknownKeys(obj: JsonObject, allowed: readonly string[], path: string): void {
  for (const key of Object.keys(obj)) {
    if (!allowed.includes(key)) {
      fail(`${path}: unknown key "${key}"${didYouMean(key, allowed)}; allowed keys: ${listNames(allowed)}`, `${path}.${key}`);
    }
  }
}

export function expectNumber(value: unknown, path: string): number {
  if (value === undefined) return fail(`${path}: expected a number (required)`, path);
  if (typeof value !== 'number' || !Number.isFinite(value)) return fail(`${path}: expected a finite number, got ${describeValue(value)}`, path);
  return value;
}

export function expectNonNegative(value: unknown, path: string): number {
  const x = expectNumber(value, path);
  if (x < 0) fail(`${path}: expected a number ≥ 0, got ${x}`, path);
  return x;
}

export function expectPositive(value: unknown, path: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    return fail(`${path}: expected a finite number > 0, got ${describeValue(value)}`, path);
  }
  return value;
}

/** A number in [min, max) (or [min, max] with `closed`); `what` says what it is ("a probability"). */
export function expectInRange(value: unknown, path: string, min: number, max: number, what = 'a number', closed = false): number {
  const x = expectNumber(value, path);
  if (x < min || (closed ? x > max : x >= max)) fail(`${path}: expected ${what} in [${min}, ${max}${closed ? ']' : ')'}, got ${x}`, path);
  return x;
}

/** A whole number in [min, max]. */
export function expectInteger(value: unknown, path: string, min: number, max = Number.MAX_SAFE_INTEGER): number {
  const range = max === Number.MAX_SAFE_INTEGER ? `≥ ${min}` : `from ${min} to ${max}`;
  if (value === undefined) return fail(`${path}: expected a whole number ${range} (required)`, path);
  if (typeof value !== 'number' || !Number.isInteger(value) || value < min || value > max) {
    return fail(`${path}: expected a whole number ${range}, got ${describeValue(value)}`, path);
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

/** An interval level strictly between 0 and 1. */
export function checkLevel(value: unknown, field: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0 || value >= 1) {
    throw new QuadratInputError(`${field}: expected a number strictly between 0 and 1 (e.g. 0.95), got ${describeValue(value)}`, { field });
  }
  return value;
}

/** One of a fixed list of texts, matched exactly (so "reml" is refused, not guessed, though named as the likely intent). */
export function checkChoice<T extends string>(value: unknown, choices: readonly T[], field: string): T {
  if (typeof value === 'string' && (choices as readonly string[]).includes(value)) return value as T;
  const quoted = choices.map((c) => `"${c}"`);
  const expected = quoted.length <= 2 ? quoted.join(' or ') : `one of ${quoted.join(', ')}`;
  const hint = typeof value === 'string' ? didYouMean(value, choices) : '';
  throw new QuadratInputError(`${field}: expected ${expected}, got ${describeValue(value)}${hint}`, { field });
}

/** A shard { index, count } with 1 ≤ index ≤ count. */
export function checkShard(value: unknown, field: string): { index: number; count: number } {
  if (!isPlainObject(value)) {
    throw new QuadratInputError(`${field}: expected { index, count } with 1 ≤ index ≤ count, got ${describeValue(value)}`, { field });
  }
  const count = expectInteger(value.count, `${field}.count`, 1);
  const index = expectInteger(value.index, `${field}.index`, 1, count);
  return { index, count };
}

/**
 * The candidate closest to `name` when it is plausibly a typo of it: a different case only, or at
 * most two edits (and fewer than half the name's length) away. Undefined when none is that close.
 */
export function nearestName(name: string, candidates: readonly string[]): string | undefined {
  const lower = name.toLowerCase();
  const sameCase = candidates.find((c) => c.toLowerCase() === lower);
  if (sameCase !== undefined) return sameCase;
  const limit = Math.min(2, Math.ceil(name.length / 2) - 1);
  let best: string | undefined;
  let bestDistance = limit + 1;
  for (const c of candidates) {
    const d = editDistance(lower, c.toLowerCase());
    if (d < bestDistance) {
      best = c;
      bestDistance = d;
    }
  }
  return best;
}

function didYouMean(name: string, candidates: readonly string[]): string {
  const near = nearestName(name, candidates);
  return near === undefined ? '' : ` (did you mean "${near}"?)`;
}

/**
 * Edits (insert, delete, substitute, swap two neighbours) turning a into b: the optimal string
 * alignment distance (Damerau 1964, Commun. ACM 7(3); Levenshtein 1966, Sov. Phys. Dokl. 10(8)).
 */
export function editDistance(a: string, b: string): number {
  const m = a.length;
  const n = b.length;
  const d: number[][] = Array.from({ length: m + 1 }, (_, i) => Array.from({ length: n + 1 }, (_, j) => (i === 0 ? j : j === 0 ? i : 0)));
  for (let i = 1; i <= m; i++) {
    for (let j = 1; j <= n; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      d[i][j] = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d[i][j] = Math.min(d[i][j], d[i - 2][j - 2] + 1);
    }
  }
  return d[m][n];
}
