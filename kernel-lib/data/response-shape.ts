/**
 * A response that looks like counts or detections, fitted as normal: worth a warning, because a
 * normal model for small counts or 0/1 data predicts impossible values and mis-states the spread
 * (common practice, no source).
 */

/**
 * The warning for a normal-family fit of `y` (column `column`), or undefined when y looks
 * continuous. Only 0 and 1: detections; every value a non-negative whole number: counts.
 */
export function responseShapeWarning(y: ArrayLike<number>, column: string): string | undefined {
  if (y.length === 0) return undefined;
  let binary = true;
  for (let i = 0; i < y.length; i++) {
    const v = y[i];
    if (!(v >= 0) || !Number.isInteger(v)) return undefined;
    if (v !== 0 && v !== 1) binary = false;
  }
  if (binary) {
    return `response "${column}" holds only 0 and 1, like detections (present/absent); the normal family fits it as a continuous measurement — consider family "binomial"`;
  }
  return `response "${column}" holds only non-negative whole numbers, like counts; the normal family fits it as a continuous measurement — consider family "poisson" or "negative-binomial"`;
}
