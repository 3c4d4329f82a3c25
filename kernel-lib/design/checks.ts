/**
 * Field checks shared by the survey-design parser. Every failure throws QuadratInputError
 * with a message that starts with the field path and says what was expected.
 */
import { QuadratInputError, describeValue, listNames } from '../model/errors';

export type JsonObject = Record<string, unknown>;

export function fail(message: string, field: string): never {
  throw new QuadratInputError(message, { field });
}

export function isPlainObject(value: unknown): value is JsonObject {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

export function expectObject(value: unknown, path: string): JsonObject {
  if (!isPlainObject(value)) return fail(`${path}: expected an object, got ${describeValue(value)}`, path);
  return value;
}

export function expectArray(value: unknown, path: string): unknown[] {
  if (!Array.isArray(value)) return fail(`${path}: expected an array, got ${describeValue(value)}`, path);
  return value;
}

export function rejectUnknownKeys(obj: JsonObject, allowed: readonly string[], path: string): void {
  for (const key of Object.keys(obj)) {
    if (!allowed.includes(key)) fail(`${path}: unknown key "${key}"; allowed keys: ${listNames(allowed)}`, `${path}.${key}`);
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

export function expectInteger(value: unknown, path: string, min: number): number {
  const x = expectNumber(value, path);
  if (!Number.isInteger(x) || x < min) fail(`${path}: expected a whole number ≥ ${min}, got ${x}`, path);
  return x;
}

/** Names of factors, covariates and the response: letters, digits and "_", not starting with a digit. */
const NAME_PATTERN = /^[A-Za-z_][A-Za-z0-9_]*$/;

export function expectName(value: unknown, path: string): string {
  if (value === undefined) return fail(`${path}: expected a name (required)`, path);
  if (typeof value !== 'string' || !NAME_PATTERN.test(value)) {
    return fail(`${path}: expected a name of letters, digits and "_" (not starting with a digit), got ${describeValue(value)}`, path);
  }
  return value;
}

/** Category labels may be any text without the characters that structure coefficient names and grid paths. */
const LABEL_FORBIDDEN = /[[\]:|./=\\]/;

export function expectLabel(value: string, path: string): string {
  if (value === '' || LABEL_FORBIDDEN.test(value)) {
    return fail(`${path}: expected a non-empty label without any of [ ] : | . / = \\, got ${describeValue(value)}`, path);
  }
  return value;
}

/** A JSON key inside an object, written for a path: `truth.fixed["x:habitat=wet"]`. */
export function keyPath(path: string, key: string): string {
  return /^[A-Za-z_][A-Za-z0-9_]*$/.test(key) ? `${path}.${key}` : `${path}[${JSON.stringify(key)}]`;
}
