/** Special functions needed by the distribution routines. */

const LANCZOS_G = 7;
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313,
  -176.61502916214059, 12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6,
  1.5056327351493116e-7,
];

/** log Γ(x) for x > 0 by the Lanczos approximation, g = 7, n = 9 (Lanczos 1964, SIAM J. Numer. Anal. B1:86). */
export function logGamma(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - logGamma(1 - x); // reflection
  x -= 1;
  let a = LANCZOS[0];
  const t = x + LANCZOS_G + 0.5;
  for (let i = 1; i < 9; i++) a += LANCZOS[i] / (x + i);
  return 0.5 * Math.log(2 * Math.PI) + (x + 0.5) * Math.log(t) - t + Math.log(a);
}

/**
 * erfc(x) to near double precision: the positive-term series
 * erf(x) = 2/√π e^{-x²} Σ 2ⁿ x^{2n+1} / (1·3···(2n+1)) for |x| < 3 and the Laplace continued
 * fraction for erfc when x ≥ 3 (Abramowitz and Stegun 1964, 7.1.6 and 7.1.14).
 */
export function erfc(x: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x < 0) return 2 - erfc(-x);
  if (x < 3) {
    let term = x;
    let sum = x;
    for (let n = 1; n < 200; n++) {
      term *= (2 * x * x) / (2 * n + 1);
      sum += term;
      if (term < sum * 1e-17) break;
    }
    return 1 - (2 / Math.sqrt(Math.PI)) * Math.exp(-x * x) * sum;
  }
  // continued fraction erfc(x) = e^{-x²}/√π · 1/(x + (1/2)/(x + 1/(x + (3/2)/(x + ...)))) by backward recurrence
  let f = x;
  for (let k = 60; k >= 1; k--) f = x + (k / 2) / f;
  return Math.exp(-x * x) / Math.sqrt(Math.PI) / f;
}

/**
 * Regularised incomplete beta I_x(a, b) by its continued fraction evaluated with the modified
 * Lentz method (Press et al., Numerical Recipes, 3rd ed. 2007, §6.4).
 */
export function incompleteBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const lnFront = logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log1p(-x);
  if (x > (a + 1) / (a + b + 2)) return 1 - incompleteBeta(1 - x, b, a);
  const tiny = 1e-300;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < tiny) d = tiny;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 1000; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((a + m2 - 1) * (a + m2));
    d = 1 + aa * d; if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c; if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d; h *= d * c;
    aa = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + m2 + 1));
    d = 1 + aa * d; if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c; if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-16) break;
  }
  return (Math.exp(lnFront) * h) / a;
}

/**
 * Regularised lower incomplete gamma P(a, x) and its complement Q(a, x) = 1 − P(a, x): the series
 * for x < a + 1, otherwise the Legendre continued fraction by modified Lentz (Press et al.,
 * Numerical Recipes, 3rd ed. 2007, §6.2). Each tail is computed directly, so small tails keep
 * their relative accuracy.
 */
export function regularizedGamma(a: number, x: number): { p: number; q: number } {
  if (!(a > 0) || Number.isNaN(x)) return { p: NaN, q: NaN };
  if (x <= 0) return { p: 0, q: 1 };
  if (x === Infinity) return { p: 1, q: 0 };
  const lnFront = a * Math.log(x) - x - logGamma(a);
  if (x < a + 1) {
    let ap = a;
    let term = 1 / a;
    let sum = term;
    for (let n = 0; n < 10000; n++) {
      ap += 1;
      term *= x / ap;
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * 1e-17) break;
    }
    const p = Math.min(1, sum * Math.exp(lnFront));
    return { p, q: 1 - p };
  }
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 10000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b; if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c; if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-16) break;
  }
  const q = Math.min(1, Math.exp(lnFront) * h);
  return { p: 1 - q, q };
}
