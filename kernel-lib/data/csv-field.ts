/**
 * The one quoting rule of every CSV Quadrat writes (replicates, metrics): a field holding a comma,
 * a double quote or a line break is wrapped in double quotes, with inner quotes doubled
 * (RFC 4180, §2 rules 6-7); data/csv reads it back unchanged.
 */
export function csvField(text: string): string {
  return /[",\n\r]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}
