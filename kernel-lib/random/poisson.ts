/**
 * Poisson variates from a seeded stream. Mean below 10: inversion by sequential search from 0
 * (Devroye 1986, Non-Uniform Random Variate Generation, §X.3.3). Mean 10 or more: the transformed
 * rejection method with squeeze PTRS (Hörmann 1993, "The transformed rejection method for
 * generating Poisson random variables", Insurance: Mathematics and Economics 12:39-45).
 */
import { logGamma } from '../numeric/special';
import type { Stream } from './stream';

/** Mean at which inversion gives way to PTRS (Hörmann 1993 recommends PTRS from 10). */
const PTRS_FROM = 10;

/** One Poisson(mean) variate; mean must be finite and ≥ 0 (0 gives 0). */
export function drawPoisson(stream: Stream, mean: number): number {
  if (!(mean >= 0) || !Number.isFinite(mean)) throw new RangeError(`drawPoisson: mean must be finite and ≥ 0, got ${mean}`);
  if (mean === 0) return 0;
  return mean < PTRS_FROM ? poissonInversion(stream, mean) : poissonPtrs(stream, mean);
}

function poissonInversion(stream: Stream, mean: number): number {
  const u = stream.uniform();
  let x = 0;
  let p = Math.exp(-mean);
  let s = p;
  // p underflows only far in the tail; stop there rather than loop on rounding in s
  while (u > s && p > 0) {
    x++;
    p *= mean / x;
    s += p;
  }
  return x;
}

function poissonPtrs(stream: Stream, mean: number): number {
  const slam = Math.sqrt(mean);
  const logLam = Math.log(mean);
  const b = 0.931 + 2.53 * slam;
  const a = -0.059 + 0.02483 * b;
  const logInvAlpha = Math.log(1.1239 + 1.1328 / (b - 3.4));
  const vr = 0.9277 - 3.6224 / (b - 2);
  for (;;) {
    const u = stream.uniform() - 0.5;
    const v = stream.uniform();
    const us = 0.5 - Math.abs(u);
    const k = Math.floor(((2 * a) / us + b) * u + mean + 0.43);
    if (us >= 0.07 && v <= vr) return k;
    if (k < 0 || (us < 0.013 && v > us)) continue;
    if (Math.log(v) + logInvAlpha - Math.log(a / (us * us) + b) <= -mean + k * logLam - logGamma(k + 1)) return k;
  }
}
