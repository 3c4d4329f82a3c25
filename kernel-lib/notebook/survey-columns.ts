/** A first look at a survey table: one row per column, and a check that the columns a model needs are there. */
import { columnLength, type Columns } from '../data/columns';
import { isMissing } from '../data/missing';
import { QuadratInputError, listNames } from '../model/errors';
import { nestedLabel } from '../data/describe-survey';

export interface ColumnOverviewRow {
  column: string;
  /** What the column is used for in the settings ('' when unused). */
  role: string;
  type: 'number' | 'text' | 'empty';
  missing: number;
  distinct: number;
  /** Range of a numeric column, or its first levels in sorted order. */
  values: string;
}

export interface SurveyColumns {
  response: string;
  factors: readonly string[];
  covariates?: readonly string[];
}

const SHOWN_LEVELS = 4;

function shortNumber(x: number): string {
  return Number.isInteger(x) ? String(x) : x.toPrecision(3);
}

/** One row per column of `data`, with its role from `roles` (column -> role). */
export function columnOverview(data: Columns, roles: Readonly<Record<string, string>> = {}): ColumnOverviewRow[] {
  const n = columnLength(data);
  return Object.keys(data).map((column) => {
    const col = data[column];
    let missing = 0;
    let numeric = true;
    let min = Infinity;
    let max = -Infinity;
    const distinct = new Set<string>();
    for (let i = 0; i < n; i++) {
      const v = col[i];
      if (isMissing(v)) {
        missing++;
        continue;
      }
      distinct.add(String(v));
      if (typeof v === 'number') {
        if (v < min) min = v;
        if (v > max) max = v;
      } else numeric = false;
    }
    const type = distinct.size === 0 ? 'empty' : numeric ? 'number' : 'text';
    let values = '';
    if (type === 'number') values = min === max ? shortNumber(min) : `${shortNumber(min)} to ${shortNumber(max)}`;
    else if (type === 'text') {
      const levels = [...distinct].sort();
      values = levels.slice(0, SHOWN_LEVELS).join(', ') + (levels.length > SHOWN_LEVELS ? ', …' : '');
    }
    return { column, role: roles[column] ?? '', type, missing, distinct: distinct.size, values };
  });
}

/** Column -> role ('response', 'grouping factor', 'covariate') for columnOverview. */
export function columnRoles(columns: SurveyColumns): Record<string, string> {
  const roles: Record<string, string> = {};
  for (const c of columns.covariates ?? []) roles[c] = 'covariate';
  for (const f of columns.factors) roles[f] = 'grouping factor';
  roles[columns.response] = 'response';
  return roles;
}

/**
 * Throws a QuadratInputError naming the column when a named column is absent or unusable:
 * the response must be numeric with at least one value, a grouping factor must have a value
 * somewhere. Row numbers in messages are 1-based data rows (the header not counted).
 */
export function checkSurveyColumns(data: Columns, columns: SurveyColumns): void {
  const available = Object.keys(data);
  const named = [columns.response, ...columns.factors, ...(columns.covariates ?? [])];
  for (const name of named) {
    if (!(name in data)) {
      throw new QuadratInputError(`column "${name}" not found; the table has ${listNames(available)}`, { column: name });
    }
  }
  const n = columnLength(data);
  const response = data[columns.response];
  let values = 0;
  for (let i = 0; i < n; i++) {
    const v = response[i];
    if (isMissing(v)) continue;
    if (typeof v !== 'number') {
      throw new QuadratInputError(
        `column "${columns.response}" (the response) must hold numbers; row ${i + 1} holds ${JSON.stringify(v)}`,
        { column: columns.response, row: i + 1 },
      );
    }
    values++;
  }
  if (values === 0) {
    throw new QuadratInputError(`column "${columns.response}" (the response) has no values`, { column: columns.response });
  }
  for (const f of columns.factors) {
    let present = false;
    for (let i = 0; i < n && !present; i++) present = !isMissing(data[f][i]);
    if (!present) throw new QuadratInputError(`column "${f}" (a grouping factor) has no values`, { column: f });
  }
}

/**
 * Row records from columns (typed arrays included), e.g. for the plot builders, which take rows.
 * A factor named in `within` (factor -> outer factor) gets its outer label in front, "ashpool/2",
 * so that plot 2 of two sites are two groups in a plot; a missing label stays missing.
 */
export function columnsToRecords(data: Columns, within: Readonly<Record<string, string>> = {}): Record<string, unknown>[] {
  const n = columnLength(data);
  const names = Object.keys(data);
  const nestedNames = Object.keys(within).filter((f) => f in data);
  const rows: Record<string, unknown>[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const row: Record<string, unknown> = {};
    for (const name of names) row[name] = data[name][i];
    for (const name of nestedNames) row[name] = nestedLabel(data, name, i, within);
    rows[i] = row;
  }
  return rows;
}
