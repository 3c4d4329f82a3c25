import { erfc, incompleteBeta, logGamma, regularizedGamma } from './special';

/** Standard normal CDF Φ(x) = erfc(-x/√2)/2. */
export function normalCdf(x: number): number {
  return 0.5 * erfc(-x / Math.SQRT2);
}

/** Standard normal quantile by Wichura (1988), Applied Statistics 37:477, algorithm AS 241 (PPND16). */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) {
    if (p === 0) return -Infinity;
    if (p === 1) return Infinity;
    return NaN;
  }
  const q = p - 0.5;
  if (Math.abs(q) <= 0.425) {
    const r = 0.180625 - q * q;
    return (q * (((((((2509.0809287301226727 * r + 33430.575583588128105) * r + 67265.770927008700853) * r +
      45921.953931549871457) * r + 13731.693765509461125) * r + 1971.5909503065514427) * r + 133.14166789178437745) * r +
      3.387132872796366608)) /
      (((((((5226.495278852545925 * r + 28729.085735721942674) * r + 39307.89580009271061) * r +
        21213.794301586595867) * r + 5394.1960214247511077) * r + 687.1870074920579083) * r + 42.313330701600911252) * r + 1);
  }
  let r = q < 0 ? p : 1 - p;
  r = Math.sqrt(-Math.log(r));
  let val: number;
  if (r <= 5) {
    r -= 1.6;
    val = (((((((7.7454501427834140764e-4 * r + 0.0227238449892691845833) * r + 0.24178072517745061177) * r +
      1.27045825245236838258) * r + 3.64784832476320460504) * r + 5.7694972214606914055) * r + 4.6303378461565452959) * r +
      1.42343711074968357734) /
      (((((((1.05075007164441684324e-9 * r + 5.475938084995344946e-4) * r + 0.0151986665636164571966) * r +
        0.14810397642748007459) * r + 0.68976733498510000455) * r + 1.6763848301838038494) * r + 2.05319162663775882187) * r + 1);
  } else {
    r -= 5;
    val = (((((((2.01033439929228813265e-7 * r + 2.71155556874348757815e-5) * r + 0.0012426609473880784386) * r +
      0.026532189526576123093) * r + 0.29656057182850489123) * r + 1.7848265399172913358) * r + 5.4637849111641143699) * r +
      6.6579046435011037772) /
      (((((((2.04426310338993978564e-15 * r + 1.4215117583164458887e-7) * r + 1.8463183175100546818e-5) * r +
        7.868691311456132591e-4) * r + 0.0148753612908506148525) * r + 0.13692988092273580531) * r + 0.59983220655588793769) * r + 1);
  }
  return q < 0 ? -val : val;
}

/** Student t CDF with ν degrees of freedom through the incomplete beta function (Abramowitz and Stegun 1964, 26.7.1 and 26.5.27). */
function studentTCdf(t: number, df: number): number {
  if (!Number.isFinite(df)) return normalCdf(t);
  const tail = 0.5 * incompleteBeta(df / (df + t * t), df / 2, 0.5);
  return t > 0 ? 1 - tail : tail;
}

/**
 * Student t quantile: safeguarded Newton iteration on the CDF, started from the Cornish-Fisher
 * expansion (Abramowitz and Stegun 1964, 26.7.5), with bisection fallback. Accurate to about 1e-12
 * for df ≥ 0.5; df = Infinity gives the normal quantile. The start is within about 1e-4 for df ≥ 3, so
 * two or three Newton steps suffice (the small-sample intervals call this once per coefficient).
 */
export function studentTQuantile(p: number, df: number): number {
  if (!(df > 0)) return NaN;
  if (!Number.isFinite(df) || df > 1e7) return normalQuantile(p);
  if (!(p > 0 && p < 1)) return p === 0 ? -Infinity : p === 1 ? Infinity : NaN;
  if (p < 0.5) return -studentTQuantile(1 - p, df);
  if (p === 0.5) return 0;
  const z = normalQuantile(p);
  const z2 = z * z;
  const g1 = (z2 + 1) * z / 4;
  const g2 = ((5 * z2 + 16) * z2 + 3) * z / 96;
  const g3 = (((3 * z2 + 19) * z2 + 17) * z2 - 15) * z / 384;
  const g4 = ((((79 * z2 + 776) * z2 + 1482) * z2 - 1920) * z2 - 945) * z / 92160;
  const cf = z + (g1 + (g2 + (g3 + g4 / df) / df) / df) / df;
  // the density's constant once: f(t) = exp(lc − (ν+1)/2 · log1p(t²/ν))
  const lc = logGamma((df + 1) / 2) - logGamma(df / 2) - 0.5 * Math.log(df * Math.PI);
  let lo = 0; // F(lo) < p
  let hi = Infinity; // F(hi) > p
  let x = cf > 0 && Number.isFinite(cf) ? cf : Math.max(1, z);
  for (let i = 0; i < 300; i++) {
    const fx = studentTCdf(x, df) - p;
    if (fx === 0) return x;
    if (fx > 0) hi = x; else lo = x;
    const dens = Math.exp(lc - ((df + 1) / 2) * Math.log1p((x * x) / df));
    let next = x - fx / dens;
    if (!(next > lo && next < hi) || !Number.isFinite(next)) next = hi === Infinity ? 2 * x + 1 : 0.5 * (lo + hi);
    if (Math.abs(next - x) <= 1e-14 * Math.max(1, Math.abs(x))) return next;
    if (next > 1e300) return Infinity;
    x = next;
  }
  return x;
}

/** Chi-square CDF with k degrees of freedom: P(k/2, x/2) (Abramowitz and Stegun 1964, 26.4.19). */
export function chiSquareCdf(x: number, k: number): number {
  if (!(k > 0)) return NaN;
  return regularizedGamma(k / 2, x / 2).p;
}

/** Chi-square upper tail Q(k/2, x/2), accurate for small tail areas. */
export function chiSquareSurvival(x: number, k: number): number {
  if (!(k > 0)) return NaN;
  return regularizedGamma(k / 2, x / 2).q;
}

/** Chi-square quantile: bisection on the CDF (or on the upper tail above the median, for accuracy). */
export function chiSquareQuantile(p: number, k: number): number {
  if (!(k > 0) || !(p >= 0 && p <= 1)) return NaN;
  if (p === 0) return 0;
  if (p === 1) return Infinity;
  const upper = p > 0.5;
  const target = upper ? 1 - p : p;
  // below the root the CDF is under p (or the tail above 1 − p)
  const below = (x: number) => (upper ? chiSquareSurvival(x, k) > target : chiSquareCdf(x, k) < target);
  return bisectIncreasing(below, Math.max(1, 2 * k));
}

/** F CDF with (d1, d2) degrees of freedom: I_{d1 x/(d1 x + d2)}(d1/2, d2/2) (Abramowitz and Stegun 1964, 26.6.2). */
export function fCdf(x: number, d1: number, d2: number): number {
  if (!(d1 > 0 && d2 > 0)) return NaN;
  if (!(x > 0)) return 0;
  if (x === Infinity) return 1;
  if (d2 === Infinity) return chiSquareCdf(d1 * x, d1);
  return incompleteBeta((d1 * x) / (d1 * x + d2), d1 / 2, d2 / 2);
}

/** F upper tail, computed as I_{d2/(d2 + d1 x)}(d2/2, d1/2) so small p-values keep their accuracy. */
export function fSurvival(x: number, d1: number, d2: number): number {
  if (!(d1 > 0 && d2 > 0)) return NaN;
  if (!(x > 0)) return 1;
  if (x === Infinity) return 0;
  if (d2 === Infinity) return chiSquareSurvival(d1 * x, d1);
  return incompleteBeta(d2 / (d2 + d1 * x), d2 / 2, d1 / 2);
}

/** F quantile by bisection on the CDF (upper tail above the median). */
export function fQuantile(p: number, d1: number, d2: number): number {
  if (!(d1 > 0 && d2 > 0) || !(p >= 0 && p <= 1)) return NaN;
  if (p === 0) return 0;
  if (p === 1) return Infinity;
  const upper = p > 0.5;
  const target = upper ? 1 - p : p;
  const below = (x: number) => (upper ? fSurvival(x, d1, d2) > target : fCdf(x, d1, d2) < target);
  return bisectIncreasing(below, 2);
}

/**
 * Root of a monotone predicate on (0, ∞): `below(x)` is true left of the root. The bracket grows
 * from `guess` by doubling, then bisection runs to a relative width of 1e-15.
 */
function bisectIncreasing(below: (x: number) => boolean, guess: number): number {
  let lo = 0;
  let hi = guess;
  while (below(hi)) {
    lo = hi;
    hi *= 2;
    if (hi > 1e300) return Infinity;
  }
  for (let i = 0; i < 400 && hi - lo > 1e-15 * hi; i++) {
    const mid = 0.5 * (lo + hi);
    if (below(mid)) lo = mid; else hi = mid;
  }
  return 0.5 * (lo + hi);
}
