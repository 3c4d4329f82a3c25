/**
 * Coefficients of a count or detection fit whose likelihood has no finite maximum: under complete or
 * quasi-complete separation (or a level with only zero counts) an estimate runs towards ±∞ and the
 * optimiser stops somewhere on a flat ridge with a huge SE (Albert and Anderson 1984, Biometrika 71, 1–10).
 */

/**
 * A link-scale SE above this has no finite maximum behind it: a factor of e^196 per SE on the rate or
 * odds scale (common practice, no source).
 */
const NO_MAXIMUM_SE = 100;

/** Positions (in `estimable` order) of coefficients whose link-scale SE exceeds NO_MAXIMUM_SE or is not finite. */
export function unboundedCoefficients(cov: Float64Array, p: number): number[] {
  const out: number[] = [];
  for (let a = 0; a < p; a++) if (!(Math.sqrt(cov[a * p + a]) <= NO_MAXIMUM_SE)) out.push(a);
  return out;
}
