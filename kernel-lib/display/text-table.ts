/** Plain-text tables for the terminal: right-aligned numbers, left-aligned text. */

export type Cell = string | number | null | undefined;

/** Format a number to `digits` significant decimals, keeping small and large values readable. */
export function formatNumber(value: number | null | undefined, digits = 4): string {
  if (value === null || value === undefined || Number.isNaN(value)) return '—';
  if (!Number.isFinite(value)) return value > 0 ? '∞' : '-∞';
  if (value === 0) return '0';
  const abs = Math.abs(value);
  if (abs >= 1e6 || abs < 1e-4) return value.toExponential(digits - 1);
  const decimals = Math.max(0, digits - 1 - Math.floor(Math.log10(abs)));
  return value.toFixed(Math.min(decimals, 8));
}

export function renderTable(header: string[], rows: Cell[][], indent = '  '): string {
  const text = rows.map((r) => r.map((c) => (typeof c === 'number' ? formatNumber(c) : c ?? '')));
  // right-align columns of numbers, including numbers already written as text ("6", "4.0")
  const numberLike = (c: Cell) => typeof c === 'number' || (typeof c === 'string' && /^-?[\d.]+$|^∞$/.test(c));
  const numeric = header.map((_, j) => rows.some((r) => numberLike(r[j])) && rows.every((r) => numberLike(r[j]) || typeof r[j] === 'number' || !r[j]));
  const widths = header.map((h, j) => Math.max(h.length, ...text.map((r) => r[j].length)));
  const line = (cells: string[]) =>
    indent + cells.map((c, j) => (numeric[j] ? c.padStart(widths[j]) : c.padEnd(widths[j]))).join('  ').trimEnd();
  return [line(header), indent + widths.map((w) => '─'.repeat(w)).join('  '), ...text.map(line)].join('\n');
}
