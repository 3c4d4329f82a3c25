import { describe, expect, it } from 'vitest';
import { Float64Arena } from '../../kernel-lib/numeric/arena';

describe('Float64Arena', () => {
  it('hands out zero-filled, non-overlapping views of one buffer', () => {
    // contract of the module (views on one ArrayBuffer; common practice, no source)
    const arena = new Float64Arena(10);
    const a = arena.take(3);
    const b = arena.take(4);
    expect(Array.from(a)).toEqual([0, 0, 0]);
    expect(Array.from(b)).toEqual([0, 0, 0, 0]);
    expect(a.buffer).toBe(b.buffer);
    a.fill(1);
    b.fill(2);
    expect(Array.from(a)).toEqual([1, 1, 1]);
    expect(Array.from(b)).toEqual([2, 2, 2, 2]);
    expect(b.byteOffset).toBe(a.byteOffset + 3 * 8);
  });

  it('can be used up exactly, then refuses more with a RangeError', () => {
    const arena = new Float64Arena(5);
    arena.take(2);
    expect(arena.take(3)).toHaveLength(3);
    expect(arena.take(0)).toHaveLength(0);
    expect(() => arena.take(1)).toThrow(RangeError);
    expect(() => arena.take(1)).toThrow(/5 doubles exhausted/);
  });

  it('an arena of capacity 0 still gives empty views', () => {
    const arena = new Float64Arena(0);
    expect(arena.take(0)).toHaveLength(0);
    expect(() => arena.take(1)).toThrow(RangeError);
  });
});
