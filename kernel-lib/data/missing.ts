/** The one missing-value rule of the data layer: null, undefined, NaN and the empty string. */
export function isMissing(value: unknown): boolean {
  return value === null || value === undefined || value === '' || (typeof value === 'number' && value !== value);
}
