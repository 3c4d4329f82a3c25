/**
 * Binomial variates from a seeded stream. With n·min(p, 1−p) below 10: inversion by sequential
 * search (Kachitvichyanukul and Schmeiser 1988, "Binomial random variate generation", Commun. ACM
 * 31(2):216, algorithm BINV). Otherwise the transformed rejection method with squeeze BTRS
 * (Hörmann 1993, "The generation of binomial random variates", J. Statist. Comput. Simul.
 * 46:101-110). Success probabilities above ½ are drawn as n minus the count of failures.
 */
import { logGamma } from '../numeric/special';
import type { Stream } from './stream';

/** One Binomial(trials, probability) variate; trials a non-negative integer, probability in [0, 1]. */
export function drawBinomial(stream: Stream, trials: number, probability: number): number {
  if (!Number.isInteger(trials) || trials < 0) throw new RangeError(`drawBinomial: trials must be a non-negative integer, got ${trials}`);
  if (!(probability >= 0 && probability <= 1)) throw new RangeError(`drawBinomial: probability must be in [0, 1], got ${probability}`);
  if (trials === 0 || probability === 0) return 0;
  if (probability === 1) return trials;
  if (probability > 0.5) return trials - drawBinomial(stream, trials, 1 - probability);
  return trials * probability < 10 ? binomialInversion(stream, trials, probability) : binomialBtrs(stream, trials, probability);
}

function binomialInversion(stream: Stream, n: number, p: number): number {
  const q = 1 - p;
  const ratio = p / q;
  for (;;) {
    let u = stream.uniform();
    let f = Math.pow(q, n);
    let x = 0;
    // BINV: walk up the pmf until the uniform is used up; restart in the (rounding) case x > n
    while (u > f) {
      u -= f;
      x++;
      if (x > n) break;
      f *= (ratio * (n - x + 1)) / x;
    }
    if (x <= n) return x;
  }
}

function binomialBtrs(stream: Stream, n: number, p: number): number {
  const q = 1 - p;
  const spq = Math.sqrt(n * p * q);
  const b = 1.15 + 2.53 * spq;
  const a = -0.0873 + 0.0248 * b + 0.01 * p;
  const c = n * p + 0.5;
  const vr = 0.92 - 4.2 / b;
  const alpha = (2.83 + 5.1 / b) * spq;
  const lpq = Math.log(p / q);
  const m = Math.floor((n + 1) * p);
  const h = logGamma(m + 1) + logGamma(n - m + 1);
  for (;;) {
    const u = stream.uniform() - 0.5;
    let v = stream.uniform();
    const us = 0.5 - Math.abs(u);
    const k = Math.floor(((2 * a) / us + b) * u + c);
    if (k < 0 || k > n) continue;
    if (us >= 0.07 && v <= vr) return k;
    v = Math.log((v * alpha) / (a / (us * us) + b));
    if (v <= h - logGamma(k + 1) - logGamma(n - k + 1) + (k - m) * lpq) return k;
  }
}
