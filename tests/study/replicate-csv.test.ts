import { describe, expect, it } from 'vitest';
import { parseReplicateCsv, replicateRowsToCsv } from '../../kernel-lib/study/replicate-csv';
import type { ReplicateRow } from '../../kernel-lib/study/replicate-row';

// Round trip of the per-replicate table: JavaScript's shortest round-trip number format
// (ECMA-262, Number::toString) reads back to the same double; quoting follows RFC 4180 §2.
describe('replicate CSV', () => {
  const rows: ReplicateRow[] = [
    { scenario: 'factors.year.levels=3', variant: 'year random', replicate: 0, parameter: 'intercept', kind: 'fixed', truth: 10, estimate: 0.1 + 0.2, se: 1 / 3, lower: -Infinity, upper: Infinity, df: Infinity, status: 'ok', reason: '' },
    { scenario: 'a,b', variant: 'say "fixed"', replicate: 1, parameter: 'sd(site)', kind: 'sd', truth: 1, estimate: NaN, se: NaN, lower: NaN, upper: NaN, df: NaN, status: 'failed', reason: 'line one\nline two, with comma' },
    { scenario: 'base', variant: 'v', replicate: 2, parameter: 'x', kind: 'fixed', truth: 0, estimate: -1.2345678901234567e-300, se: 5e-324, lower: -1, upper: 1, df: 17, status: 'singular', reason: '' },
  ];

  it('reads back exactly what it wrote, with quoting, NaN and infinities', () => {
    const text = replicateRowsToCsv(rows, true);
    const back = parseReplicateCsv(text);
    expect(back).toEqual(rows);
  });

  it('names the line of a malformed record', () => {
    const text = replicateRowsToCsv(rows, true) + 'too,few,fields\n';
    expect(() => parseReplicateCsv(text, 'r.csv')).toThrow(/r\.csv, line 6: expected 13 fields, found 3/);
  });
});
