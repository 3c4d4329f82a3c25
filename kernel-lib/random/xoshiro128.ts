/**
 * xoshiro128** — a small, fast 32-bit generator with 128 bits of state
 * (Blackman and Vigna 2021, "Scrambled linear pseudorandom number generators", ACM TOMS 47(4)).
 * Chosen over seedrandom's own generators because every step is a handful of 32-bit integer
 * operations that V8 keeps in registers (no closures, no arrays), and because it hands out raw
 * 32-bit words: the normal sampler needs separate bits for layer, sign and position.
 */

/** 2^-52: scale of a 52-bit integer to [0, 1). */
const TWO_POW_MINUS_52 = 1 / 4503599627370496;
/** 2^26: shift of the high 26 bits in a 52-bit integer built from two words. */
const TWO_POW_26 = 67108864;

/**
 * Map two 32-bit words to a double strictly inside (0, 1): the top 26 bits of each make a
 * 52-bit integer k, and the result is (k + 1/2) / 2^52. Both k + 1/2 and the quotient are exact
 * in double precision, so the extremes are 2^-53 and 1 - 2^-53 (neither 0 nor 1, so log() is safe).
 */
export function uniformFromWords(a: number, b: number): number {
  return ((a >>> 6) * TWO_POW_26 + (b >>> 6) + 0.5) * TWO_POW_MINUS_52;
}

/** Same 52 bits as uniformFromWords but on [0, 1) (0 included); used where 0 is harmless. */
export function unitFromWords(a: number, b: number): number {
  return ((a >>> 6) * TWO_POW_26 + (b >>> 6)) * TWO_POW_MINUS_52;
}

export class Xoshiro128 {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;

  /** State words are taken as 32-bit integers; an all-zero state (a fixed point) is replaced by (1,0,0,0). */
  constructor(s0: number, s1: number, s2: number, s3: number) {
    this.s0 = s0 | 0;
    this.s1 = s1 | 0;
    this.s2 = s2 | 0;
    this.s3 = s3 | 0;
    if ((this.s0 | this.s1 | this.s2 | this.s3) === 0) this.s0 = 1;
  }

  /** Next output as an unsigned 32-bit integer. */
  nextUint32(): number {
    const s1 = this.s1;
    // result = rotl(s1 * 5, 7) * 9 (the ** scrambler)
    const m = Math.imul(s1, 5);
    const result = Math.imul((m << 7) | (m >>> 25), 9) >>> 0;
    const t = s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= s1;
    this.s1 = s1 ^ this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = (this.s3 << 11) | (this.s3 >>> 21);
    return result;
  }

  /** The four state words as signed 32-bit integers (for tests and checkpoints). */
  state(): [number, number, number, number] {
    return [this.s0, this.s1, this.s2, this.s3];
  }
}
