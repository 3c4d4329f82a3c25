import { describe, expect, it } from 'vitest';
import { csvField, csvNumber } from '../../kernel-lib/data/csv-field';
import { parseCsv } from '../../kernel-lib/data/csv';

describe('csvField', () => {
  it('quotes a field with a comma, a quote or a line break and doubles inner quotes (RFC 4180, section 2, rules 6-7)', () => {
    expect(csvField('plain text')).toBe('plain text');
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "wet"')).toBe('"say ""wet"""');
    expect(csvField('two\nlines')).toBe('"two\nlines"');
    expect(csvField('carriage\rreturn')).toBe('"carriage\rreturn"');
    expect(csvField('')).toBe('');
  });

  it('what it writes, the CSV reader gives back unchanged', () => {
    const texts = ['not estimable: x, y', 'a "quoted" level', 'habitat=wet', 'line\nbreak', 'x:grazing=ungrazed'];
    const csv = `name,other\n${texts.map((t, i) => `${csvField(t)},r${i}`).join('\n')}\n`;
    const cols = parseCsv(csv);
    expect(cols.name).toEqual(texts);
    expect(cols.other).toEqual(texts.map((_, i) => `r${i}`));
  });
});

describe('csvNumber', () => {
  it('writes the shortest text that reads back as the same double (ECMA-262 Number::toString), NaN empty, infinities Inf/-Inf', () => {
    for (const v of [0.1 + 0.2, 1 / 3, -2.5e-300, 123456789.125, 5e-324]) expect(Number(csvNumber(v))).toBe(v);
    expect(csvNumber(0.1 + 0.2)).toBe('0.30000000000000004');
    expect(csvNumber(NaN)).toBe('');
    expect(csvNumber(Infinity)).toBe('Inf');
    expect(csvNumber(-Infinity)).toBe('-Inf');
  });
});
