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

/** 32-bit finaliser of MurmurHash3 (Appleby 2011, public domain): a bijective avalanche mix. */
function fmix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h | 0;
}

/** Many streams under one key (one per replicate): `stream(i)` equals no other index's and needs no re-seeding. */
export interface ReplicateStreams {
  readonly key: string;
  stream(index: number): Stream;
}

/**
 * A set of streams for the replicates of one key: the key is hashed once by seedrandom (as in createStream), and member i
 * gets the four seed words mixed with i through the MurmurHash3 finaliser, in the manner of
 * SplitMix seeding (Steele, Lea and Flood 2014, OOPSLA). Deriving a member costs a few integer
 * operations instead of a full seedrandom key schedule, which matters when a study seeds one
 * stream per replicate. Members depend only on (key parts, i).
 */
export function replicateStreams(...keyParts: KeyPart[]): ReplicateStreams {
  const key = streamKey(...keyParts);
  const arc4 = seedrandom(key);
  const b0 = arc4.int32();
  const b1 = arc4.int32();
  const b2 = arc4.int32();
  const b3 = arc4.int32();
  return {
    key,
    stream(index: number): Stream {
      if (!Number.isInteger(index) || index < 0 || index > 0x7fffffff) {
        throw new RangeError(`replicateStreams.stream(i): i must be an integer from 0 to 2^31 - 1, got ${index}`);
      }
      const x = Math.imul(index + 1, 0x9e3779b9);
      const gen = new Xoshiro128(fmix32(b0 ^ x), fmix32(b1 ^ fmix32(x + 1)), fmix32(b2 ^ fmix32(x + 2)), fmix32(b3 ^ fmix32(x + 3)));
      // discard a few outputs so that nearby indices decorrelate fully (common practice, no source)
      for (let k = 0; k < 8; k++) gen.nextUint32();
      return new XoshiroStream(`${key}|#${index}`, gen);
    },
  };
}
