/**
 * The one quoting rule of every CSV Quadrat writes (replicates, metrics): a field holding a comma,
 * a double quote or a line break is wrapped in double quotes, with inner quotes doubled
 * (RFC 4180, §2 rules 6-7); data/csv reads it back unchanged.
 */
export function csvField(text: string): string {
  return /[",\n\r]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * A number as every Quadrat CSV writes it: JavaScript's shortest round-trip form (reading gives the
 * exact double back), NaN as an empty cell, infinities as "Inf" / "-Inf".
 */
export function csvNumber(v: number): string {
  if (Number.isNaN(v)) return '';
  if (v === Infinity) return 'Inf';
  if (v === -Infinity) return '-Inf';
  return String(v);
}
