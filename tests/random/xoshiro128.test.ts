import { describe, expect, it } from 'vitest';
import { Xoshiro128, uniformFromWords, unitFromWords } from '../../kernel-lib/random/xoshiro128';

describe('Xoshiro128', () => {
  it('matches the reference C implementation from state (1, 2, 3, 4)', () => {
    // Reference C code of xoshiro128** (Blackman and Vigna 2021, public domain), compiled with gcc
    // and run from s = {1, 2, 3, 4}; the first three also follow by hand from the update rules.
    const g = new Xoshiro128(1, 2, 3, 4);
    const expected = [11520, 0, 5927040, 70819200, 2031721883, 1637235492, 1287239034, 3734860849];
    for (const e of expected) expect(g.nextUint32()).toBe(e);
  });

  it('matches the reference C implementation after 1000 steps from a large state', () => {
    // Same reference C program, s = {0x9E3779B9, 0x7F4A7C15, 0xDEADBEEF, 0x01234567}, outputs 1001..1004.
    const g = new Xoshiro128(0x9e3779b9, 0x7f4a7c15, 0xdeadbeef, 0x01234567);
    for (let i = 0; i < 1000; i++) g.nextUint32();
    expect([g.nextUint32(), g.nextUint32(), g.nextUint32(), g.nextUint32()]).toEqual([
      1011553451, 783761104, 1056879273, 2410485982,
    ]);
  });

  it('matches the reference C implementation from the all-ones state (words above 2^31)', () => {
    // Same reference C program, s = {0xFFFFFFFF} × 4: outputs 1..6, then the state words
    // (printed unsigned by C; state() gives them as signed 32-bit integers).
    const g = new Xoshiro128(0xffffffff, 0xffffffff, 0xffffffff, 0xffffffff);
    const out = Array.from({ length: 6 }, () => g.nextUint32());
    expect(out).toEqual([4294962679, 4294962679, 4292019319, 2943360, 1509943680, 246671744]);
    expect(g.state()).toEqual([535823358, 2017459712, 1614546943, 2682260225 - 2 ** 32]);
  });

  it('replaces the all-zero state, which would output zeros forever', () => {
    // The all-zero state is the fixed point of any linear generator (Blackman and Vigna 2021, section 2).
    const g = new Xoshiro128(0, 0, 0, 0);
    let any = 0;
    for (let i = 0; i < 10; i++) any |= g.nextUint32();
    expect(any).not.toBe(0);
  });
});

describe('uniformFromWords', () => {
  it('stays strictly inside (0, 1) at the extreme words', () => {
    // (k + 1/2) / 2^52 with k in 0..2^52-1: extremes 2^-53 and 1 - 2^-53 (exact binary arithmetic).
    expect(uniformFromWords(0, 0)).toBe(2 ** -53);
    expect(uniformFromWords(0xffffffff, 0xffffffff)).toBe(1 - 2 ** -53);
    expect(uniformFromWords(0xffffffff, 0xffffffff)).toBeLessThan(1);
  });
});

describe('unitFromWords', () => {
  it('maps the top 26 bits of two words to k / 2^52 on [0, 1)', () => {
    // k = (a >>> 6) · 2^26 + (b >>> 6), result k / 2^52 (exact binary arithmetic; common practice, no source)
    expect(unitFromWords(0, 0)).toBe(0);
    expect(unitFromWords(0x3f, 0x3f)).toBe(0); // the low 6 bits of each word are dropped
    expect(unitFromWords(0, 64)).toBe(2 ** -52);
    expect(unitFromWords(64, 0)).toBe(2 ** -26);
    expect(unitFromWords(0xffffffff, 0xffffffff)).toBe(1 - 2 ** -52);
    // the open version sits half a step above: (k + 1/2) / 2^52
    expect(uniformFromWords(64, 0) - unitFromWords(64, 0)).toBe(2 ** -53);
  });
});
