/**
 * Sizes a simulated survey may have, checked before anything is allocated: a typo such as
 * `"levels": 1e9` is refused with the memory it would need instead of exhausting it.
 */
import { fail } from '../model/option-checks';

/** Levels of one factor (nested levels counted through their outer factors). */
const MAX_LEVELS = 1_000_000;
/** Rows of one simulated data set. */
const MAX_ROWS = 10_000_000;

/** Rough bytes per level (its label and index entries) and per row (level indices, columns, model matrices). */
const BYTES_PER_LEVEL = 64;
const bytesPerRow = (factors: number) => 4 * factors + 8 * (factors + 6);

/** "48 GB", "310 MB": a size for a message. */
function formatBytes(bytes: number): string {
  const units = ['bytes', 'kB', 'MB', 'GB', 'TB', 'PB'];
  let v = bytes;
  let u = 0;
  while (v >= 1000 && u < units.length - 1) {
    v /= 1000;
    u++;
  }
  return `${v >= 100 || u === 0 ? Math.round(v) : v.toPrecision(2)} ${units[u]}`;
}

/** Refuse a factor with more than MAX_LEVELS levels in all. */
export function checkFactorLevels(name: string, totalLevels: number, field: string): void {
  if (totalLevels > MAX_LEVELS) {
    fail(
      `${field}: factor "${name}" would have ${totalLevels.toLocaleString('en-US')} levels, beyond the limit of ${MAX_LEVELS.toLocaleString('en-US')}; ` +
        `its labels alone would need about ${formatBytes(totalLevels * BYTES_PER_LEVEL)} in memory`,
      field,
    );
  }
}

/** Refuse a survey whose complete data set would have more than MAX_ROWS rows. */
export function checkSurveyRows(levels: readonly number[], perCell: number, field: string): void {
  let rows = perCell;
  for (const l of levels) rows *= l;
  if (rows > MAX_ROWS) {
    fail(
      `${field}: a simulated data set would have ${rows.toLocaleString('en-US', { maximumSignificantDigits: 3 })} rows (product of the factors' levels × perCell), ` +
        `beyond the limit of ${MAX_ROWS.toLocaleString('en-US')}; it would need about ${formatBytes(rows * bytesPerRow(levels.length))} in memory`,
      field,
    );
  }
}
