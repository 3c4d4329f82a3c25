/**
 * The naming rules of a survey design (names of simulated columns, level labels, keys in a path).
 * Generic checks (types, keys, numbers, ranges) are model/option-checks, shared by every parser.
 */
import { describeValue } from '../model/errors';
import { fail } from '../model/option-checks';

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
  return NAME_PATTERN.test(key) ? `${path}.${key}` : `${path}[${JSON.stringify(key)}]`;
}
