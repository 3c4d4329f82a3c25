/**
 * Data a mixed model cannot describe, found before fitting so that the fit reports a reason
 * instead of variance components of 1e-8 or overflowing sums of squares.
 */
import type { DesignMatrices } from '../data/design-matrices';

/** Beyond this magnitude squares and cross-products of a column overflow double precision (about 1.8e308). */
const OVERFLOW_MAGNITUDE = 1e150;

/** Why the design cannot be fitted ('' when it can): constant response, response constant within every group, overflowing columns. */
export function degenerateReason(design: DesignMatrices): string {
  const { n, p, X, y } = design;
  if (n === 0) return '';
  let lo = y[0];
  let hi = y[0];
  for (let i = 1; i < n; i++) {
    if (y[i] < lo) lo = y[i];
    else if (y[i] > hi) hi = y[i];
  }
  if (lo === hi) return `degenerate data: the response is constant (every value is ${lo}); there is no variation to model`;
  for (const term of design.random) {
    if (withinEveryLevel(y, term.index, term.levels.length)) {
      return `degenerate data: the response is constant within every level of ${term.factor} (no variation between ` +
        'observations of the same level, so the residual variance is zero); check that the response column is the intended one';
    }
  }
  for (let j = 0; j < p; j++) {
    let max = 0;
    for (let i = 0; i < n; i++) max = Math.max(max, Math.abs(X[i * p + j]));
    if (max > OVERFLOW_MAGNITUDE) {
      return `values overflow: column ${design.fixedNames[j]} reaches ${max.toPrecision(3)}, whose square exceeds the floating-point range; ` +
        'divide the column by a power of ten before fitting';
    }
  }
  return '';
}

/** True when y is constant within every level and at least one level has two or more observations. */
function withinEveryLevel(y: Float64Array, index: Int32Array, levels: number): boolean {
  const first = new Float64Array(levels).fill(NaN);
  let repeated = false;
  for (let i = 0; i < y.length; i++) {
    const l = index[i];
    if (first[l] !== first[l]) first[l] = y[i];
    else if (first[l] !== y[i]) return false;
    else repeated = true;
  }
  return repeated;
}
