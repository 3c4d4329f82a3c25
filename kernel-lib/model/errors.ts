/**
 * The one error type for bad input (model description, table, CSV). Messages are one line,
 * name the culprit (field path, column, row) and say what was expected.
 */

export interface QuadratInputErrorDetails {
  /** Path of the offending model field, e.g. "model.groups[1].as". */
  field?: string;
  /** Offending column name. */
  column?: string;
  /** Offending row, 1-based data row number (the header is not counted). */
  row?: number;
}

export class QuadratInputError extends Error {
  field?: string;
  column?: string;
  row?: number;

  constructor(message: string, details: QuadratInputErrorDetails = {}) {
    super(message);
    this.name = 'QuadratInputError';
    if (details.field !== undefined) this.field = details.field;
    if (details.column !== undefined) this.column = details.column;
    if (details.row !== undefined) this.row = details.row;
    // Keep `instanceof` working when compiled to older targets.
    Object.setPrototypeOf(this, new.target.prototype);
  }
}

/**
 * Quote a value for an error message: strings in double quotes (or single quotes, as the plot
 * builders write field names and values), everything else as JSON-ish text.
 */
export function describeValue(value: unknown, quote: '"' | "'" = '"'): string {
  if (typeof value === 'string') return quote === '"' ? JSON.stringify(value) : `'${value}'`;
  if (value === undefined) return 'undefined (missing)';
  if (typeof value === 'number' || typeof value === 'boolean' || value === null) return String(value);
  if (typeof value === 'bigint') return `${value}n`;
  if (Array.isArray(value)) return 'an array';
  if (typeof value === 'object') return 'an object';
  return typeof value;
}

/** List names for a message: `a, b, c` (at most `max`, then "… and N more"). */
export function listNames(names: readonly string[], max = 20): string {
  if (names.length === 0) return '(none)';
  const shown = names.slice(0, max).join(', ');
  return names.length > max ? `${shown}, … and ${names.length - max} more` : shown;
}
