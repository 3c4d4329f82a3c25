/**
 * Formatted HTML tables for notebooks and reports, from row records, an arquero table or a
 * column set. Numbers are rounded to significant digits; metric rows that carry a Monte Carlo
 * standard error show "value (mcse)" by the rule of formatMetric.
 */
import { type Columns, type TableLike, columnLength, toColumns } from '../data/columns';
import { QuadratInputError, listNames } from '../model/errors';
import { type Cell, formatNumber, renderTable } from './text-table';
import { formatMetric } from '../study/format-metric';
import { escapeHtml } from './escape-html';
import { displayBundle } from './tslab-bridge';

export interface HtmlTableOptions {
  /** Significant digits of numbers that are not integers (default 4). */
  digits?: number;
  /** Columns to show, in this order (default: all, in input order). */
  columns?: string[];
  caption?: string;
  /**
   * Merge `mcse` into `value` as "value (mcse)" (default: when both columns exist). With
   * `true` both columns must exist.
   */
  mcse?: boolean;
  /** Rows shown at most; the rest is counted in a note (default 500). */
  maxRows?: number;
}

export type TableInput = readonly object[] | TableLike | Columns;

interface PreparedTable {
  header: string[];
  /** Cell texts, already formatted (not escaped). */
  cells: string[][];
  /** Whether each column is numeric (right-aligned). */
  numeric: boolean[];
  caption?: string;
  hiddenRows: number;
}

/** Integers are shown whole (counts stay "120", not "120.0"); other numbers to `digits` significant digits. */
export function formatCell(value: unknown, digits: number): string {
  if (value === null || value === undefined) return 'NA';
  if (typeof value === 'number') {
    if (Number.isNaN(value)) return 'NA';
    if (Number.isInteger(value) && Math.abs(value) < 1e15) return String(value);
    return formatNumber(value, digits);
  }
  if (typeof value === 'string') return value;
  if (typeof value === 'boolean' || typeof value === 'bigint') return String(value);
  if (value instanceof Date) return Number.isNaN(value.getTime()) ? 'NA' : value.toISOString();
  return JSON.stringify(value) ?? String(value);
}

function prepareTable(data: TableInput, options: HtmlTableOptions): PreparedTable {
  const digits = options.digits ?? 4;
  if (!Number.isInteger(digits) || digits < 1 || digits > 15) {
    throw new QuadratInputError(`table option "digits": expected an integer from 1 to 15, got ${digits}`, { field: 'digits' });
  }
  const maxRows = options.maxRows ?? 500;
  if (!Number.isInteger(maxRows) || maxRows < 0) {
    throw new QuadratInputError(`table option "maxRows": expected a non-negative integer, got ${maxRows}`, { field: 'maxRows' });
  }
  const cols = toColumns(data);
  const n = columnLength(cols);
  const available = Object.keys(cols);
  const hasMetric = available.includes('value') && available.includes('mcse');
  if (options.mcse === true && !hasMetric) {
    const missing = ['value', 'mcse'].filter((c) => !available.includes(c));
    throw new QuadratInputError(
      `table option "mcse": needs columns "value" and "mcse", missing ${listNames(missing)} (columns are ${listNames(available)})`,
      { field: 'mcse' },
    );
  }
  const mergeMcse = options.mcse ?? hasMetric;
  let names = options.columns ?? available;
  for (const name of names) {
    if (!available.includes(name)) {
      throw new QuadratInputError(`table option "columns": no column "${name}"; columns are ${listNames(available)}`, { column: name });
    }
  }
  if (mergeMcse) names = names.filter((name) => name !== 'mcse');

  const shown = Math.min(n, maxRows);
  const header = names.map((name) => (mergeMcse && name === 'value' ? 'value (MCSE)' : name));
  const numeric = names.map((name) => {
    if (mergeMcse && name === 'value') return true;
    const col = cols[name];
    let sawNumber = false;
    for (let i = 0; i < n; i++) {
      const v = col[i];
      if (typeof v === 'number') sawNumber = true;
      else if (v !== null && v !== undefined) return false;
    }
    return sawNumber;
  });
  const cells: string[][] = [];
  for (let i = 0; i < shown; i++) {
    cells.push(
      names.map((name) => {
        if (mergeMcse && name === 'value') {
          const value = cols.value[i];
          const mcse = cols.mcse[i];
          if (typeof value !== 'number') return formatCell(value, digits);
          return formatMetric(value, typeof mcse === 'number' ? mcse : NaN);
        }
        return formatCell(cols[name][i], digits);
      }),
    );
  }
  return { header, cells, numeric, caption: options.caption, hiddenRows: n - shown };
}

export function htmlTable(data: TableInput, options: HtmlTableOptions = {}): string {
  const t = prepareTable(data, options);
  const align = (j: number) => (t.numeric[j] ? ' style="text-align:right"' : ' style="text-align:left"');
  const lines = ['<table class="quadrat-table">'];
  if (t.caption !== undefined) lines.push(`<caption>${escapeHtml(t.caption)}</caption>`);
  lines.push(`<thead><tr>${t.header.map((h, j) => `<th${align(j)}>${escapeHtml(h)}</th>`).join('')}</tr></thead>`);
  lines.push('<tbody>');
  for (const row of t.cells) lines.push(`<tr>${row.map((c, j) => `<td${align(j)}>${escapeHtml(c)}</td>`).join('')}</tr>`);
  lines.push('</tbody>');
  if (t.hiddenRows > 0) {
    lines.push(`<tfoot><tr><td colspan="${t.header.length}">… ${t.hiddenRows} more rows not shown</td></tr></tfoot>`);
  }
  lines.push('</table>');
  return lines.join('\n');
}

/** The same table as plain text, for consoles. */
export function textTable(data: TableInput, options: HtmlTableOptions = {}): string {
  const t = prepareTable(data, options);
  // Cells are pre-formatted strings, so renderTable only pads; numeric columns are right-aligned by padding here.
  const widths = t.header.map((h, j) => Math.max(h.length, ...t.cells.map((r) => r[j].length)));
  const rows: Cell[][] = t.cells.map((r) => r.map((c, j) => (t.numeric[j] ? c.padStart(widths[j]) : c)));
  const parts = [];
  if (t.caption !== undefined) parts.push(t.caption);
  parts.push(renderTable(t.header.map((h, j) => (t.numeric[j] ? h.padStart(widths[j]) : h)), rows));
  if (t.hiddenRows > 0) parts.push(`  … ${t.hiddenRows} more rows not shown`);
  return parts.join('\n');
}

/** Display the table in a tslab cell (HTML with a plain-text alternative), or print it outside one. */
export function showTable(data: TableInput, options: HtmlTableOptions = {}): void {
  const html = htmlTable(data, options);
  const text = textTable(data, options);
  if (!displayBundle({ 'text/html': html, 'text/plain': text })) console.log(text);
}
