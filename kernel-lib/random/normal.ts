/**
 * Standard normal variates.
 *
 * Default: the ziggurat method (Marsaglia and Tsang 2000, "The ziggurat method for generating
 * random variables", J. Stat. Software 5(8)) on the half-normal with 256 equal-area layers,
 * a random sign, the exact wedge test and Marsaglia's (1964) exact tail method. The layer index,
 * the sign and the position come from disjoint bits of two 32-bit words, which avoids the
 * correlation between layer and position noted by Doornik (2005, "An improved ziggurat method
 * to generate normal random samples", Oxford working paper).
 *
 * Alternative: Marsaglia's polar method (Marsaglia and Bray 1964, SIAM Review 6(3)), kept for
 * speed comparison and as a second exact sampler (bench/normal-speed.js).
 */
import { unitFromWords } from './xoshiro128';

/** What a normal sampler reads from its generator. */
export interface RandomBits {
  /** Unsigned 32-bit word. */
  nextUint32(): number;
  /** Uniform strictly inside (0, 1). */
  uniform(): number;
}

export interface ZigguratTables {
  /** Number of layers (a power of two). */
  layers: number;
  /** Start of the tail. */
  r: number;
  /** Common area of each layer (base layer includes the tail), for the density exp(-x²/2). */
  v: number;
  /** Right edge of layer i; x[0] is the pseudo-width v / f(r) of the base layer. */
  x: Float64Array;
  /** Acceptance ratio x[i-1] / x[i] (layer 0: r / x[0]; layer 1: 0). */
  k: Float64Array;
  /** f(x[i]) = exp(-x[i]²/2), with f[0] = 1 (the top of layer 1). */
  f: Float64Array;
}

/** Unnormalised normal density used for the layers. */
function density(x: number): number {
  return Math.exp(-0.5 * x * x);
}

/**
 * Mills ratio R(x) = ∫_x^∞ exp(-t²/2) dt / exp(-x²/2) by its continued fraction
 * 1/(x + 1/(x + 2/(x + 3/(x + …)))) (Abramowitz and Stegun 1964, 26.2.14); for x ≥ 3,
 * 200 terms are far beyond double precision.
 */
export function millsRatio(x: number): number {
  let t = x;
  for (let k = 200; k >= 1; k--) t = x + k / t;
  return 1 / t;
}

/**
 * Excess of the top layer for a trial tail start r: the recursion x_{i-1} = f⁻¹(v/x_i + f(x_i))
 * (Marsaglia and Tsang 2000, section 2) must end at f(x_0) = 1 exactly. Positive when r is too
 * small (the layers run out of room before reaching the mode).
 */
function topExcess(r: number, layers: number): number {
  const v = r * density(r) + density(r) * millsRatio(r);
  let x = r;
  for (let i = layers - 1; i >= 1; i--) {
    const y = v / x + density(x);
    if (y >= 1) return y - 1 + i; // ran past the mode early: clearly too small
    if (i === 1) return y - 1;
    x = Math.sqrt(-2 * Math.log(y));
  }
  return 0;
}

/**
 * Build the ziggurat tables, solving for the tail start r by bisection so that the layers
 * tile the half-normal exactly (to double precision) instead of relying on published decimals.
 */
export function buildZigguratTables(layers: number): ZigguratTables {
  if (!Number.isInteger(layers) || layers < 4 || (layers & (layers - 1)) !== 0) {
    throw new RangeError(`buildZigguratTables: layers must be a power of two ≥ 4, got ${layers}`);
  }
  let lo = 1;
  let hi = 6;
  for (let it = 0; it < 200 && hi - lo > 0; it++) {
    const mid = 0.5 * (lo + hi);
    if (mid === lo || mid === hi) break;
    if (topExcess(mid, layers) > 0) lo = mid;
    else hi = mid;
  }
  const r = 0.5 * (lo + hi);
  const v = r * density(r) + density(r) * millsRatio(r);
  const x = new Float64Array(layers);
  const f = new Float64Array(layers);
  const k = new Float64Array(layers);
  x[layers - 1] = r;
  for (let i = layers - 2; i >= 1; i--) x[i] = Math.sqrt(-2 * Math.log(v / x[i + 1] + density(x[i + 1])));
  x[0] = v / density(r);
  f[0] = 1;
  for (let i = 1; i < layers; i++) f[i] = density(x[i]);
  k[0] = r / x[0];
  k[1] = 0;
  for (let i = 2; i < layers; i++) k[i] = x[i - 1] / x[i];
  return { layers, r, v, x, k, f };
}

const ZIG = buildZigguratTables(256);
const ZX = ZIG.x;
const ZK = ZIG.k;
const ZF = ZIG.f;
const ZR = ZIG.r;
const INV_ZR = 1 / ZIG.r;

/** One standard normal variate by the 256-layer ziggurat; about 1% of calls leave the fast path. */
export function zigguratNormal(bits: RandomBits): number {
  for (;;) {
    const a = bits.nextUint32();
    const b = bits.nextUint32();
    // Bits 26..31 of each word give the 52-bit position; the low 6 bits of a and bits 0..1 of b
    // choose the layer, bit 2 of b the sign.
    const u = unitFromWords(a, b);
    const i = (a & 63) | ((b & 3) << 6);
    const negative = (b & 4) !== 0;
    const x = u * ZX[i];
    if (u < ZK[i]) return negative ? -x : x;
    if (i === 0) {
      // Tail beyond r: Marsaglia (1964, Ann. Math. Stat. 35) — exact rejection from an exponential.
      let t: number;
      let e: number;
      do {
        t = -Math.log(bits.uniform()) * INV_ZR;
        e = -Math.log(bits.uniform());
      } while (e + e < t * t);
      return negative ? -(ZR + t) : ZR + t;
    }
    // Wedge between x[i-1] and x[i]: accept under the density, else start over.
    const y = ZF[i] + bits.uniform() * (ZF[i - 1] - ZF[i]);
    if (y < Math.exp(-0.5 * x * x)) return negative ? -x : x;
  }
}

/**
 * A polar-method sampler bound to a uniform source (Marsaglia and Bray 1964). It yields pairs,
 * so it keeps the second value of each pair; one sampler per stream.
 */
export function createPolarSampler(uniform: () => number): () => number {
  let spare = 0;
  let hasSpare = false;
  return () => {
    if (hasSpare) {
      hasSpare = false;
      return spare;
    }
    let v1: number;
    let v2: number;
    let s: number;
    do {
      v1 = 2 * uniform() - 1;
      v2 = 2 * uniform() - 1;
      s = v1 * v1 + v2 * v2;
    } while (s >= 1 || s === 0);
    const m = Math.sqrt((-2 * Math.log(s)) / s);
    spare = v2 * m;
    hasSpare = true;
    return v1 * m;
  };
}
