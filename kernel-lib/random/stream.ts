/**
 * Seeded random streams. A stream is derived from a key (e.g. study seed, scenario key,
 * replicate number), so any replicate can be re-run alone and workers need no shared state.
 *
 * Derivation: the key parts are joined into one text, which seedrandom's ARC4 seeding hashes
 * (its key mixing plus RC4-drop[256]); four 32-bit words of that output seed xoshiro128**
 * (see ./xoshiro128 for why that generator).
 */
import seedrandom from 'seedrandom';
import { Xoshiro128, uniformFromWords } from './xoshiro128';
import { zigguratNormal } from './normal';

export type KeyPart = string | number;

export interface Stream {
  /** The joined key text the stream was derived from. */
  readonly key: string;
  /** Uniform strictly inside (0, 1), 52 random bits. */
  uniform(): number;
  /** Standard normal variate (ziggurat). */
  normal(): number;
  /** Uniform integer in 0..n-1 (exact, by rejection); n an integer in 1..2^32. */
  int(n: number): number;
  /** Raw unsigned 32-bit word. */
  nextUint32(): number;
}

const TWO_POW_32 = 4294967296;

class XoshiroStream implements Stream {
  readonly key: string;
  private readonly gen: Xoshiro128;

  constructor(key: string, gen: Xoshiro128) {
    this.key = key;
    this.gen = gen;
  }

  nextUint32(): number {
    return this.gen.nextUint32();
  }

  uniform(): number {
    const a = this.gen.nextUint32();
    return uniformFromWords(a, this.gen.nextUint32());
  }

  normal(): number {
    return zigguratNormal(this);
  }

  int(n: number): number {
    if (!Number.isInteger(n) || n < 1 || n > TWO_POW_32) {
      throw new RangeError(`stream.int(n): n must be an integer from 1 to 2^32, got ${n}`);
    }
    // Reject the top partial block so every residue is equally likely (common practice, no source).
    const limit = TWO_POW_32 - (TWO_POW_32 % n);
    let w = this.gen.nextUint32();
    while (w >= limit) w = this.gen.nextUint32();
    return w % n;
  }
}

/**
 * Join key parts into the seeding text. Parts are written with String() and separated by "|";
 * a "|" or "\" inside a part is escaped, so ("a|b") and ("a", "b") give different keys.
 */
export function streamKey(...keyParts: KeyPart[]): string {
  if (keyParts.length === 0) throw new RangeError('createStream: give at least one key part (e.g. the study seed)');
  return keyParts
    .map((part, i) => {
      if (typeof part === 'number') {
        if (!Number.isFinite(part)) throw new RangeError(`createStream: key part ${i} must be a finite number or text, got ${part}`);
        return String(part);
      }
      if (typeof part !== 'string') {
        throw new TypeError(`createStream: key part ${i} must be a number or text, got ${typeof part}`);
      }
      return part.replace(/[\\|]/g, (c) => `\\${c}`);
    })
    .join('|');
}

/** A stream derived from the key parts; the same parts always give the same sequence. */
export function createStream(...keyParts: KeyPart[]): Stream {
  const key = streamKey(...keyParts);
  const arc4 = seedrandom(key);
  const gen = new Xoshiro128(arc4.int32(), arc4.int32(), arc4.int32(), arc4.int32());
  return new XoshiroStream(key, gen);
}
