import { describe, expect, it } from 'vitest';
import {
  FitStatusAccumulator, ParameterAccumulator, SEVERITY_FAILED, SEVERITY_NONCONVERGED, SEVERITY_SINGULAR,
} from '../../kernel-lib/study/metric-accumulators';
import type { ReplicateRow } from '../../kernel-lib/study/replicate-row';

const row = (replicate: number, estimate: number, lower: number, upper: number, extra: Partial<ReplicateRow> = {}): ReplicateRow => ({
  scenario: 'A', variant: 'v', replicate, parameter: 'slope', kind: 'fixed', truth: 1,
  estimate, se: 0.5, lower, upper, df: Infinity, status: 'ok', reason: '', ...extra,
});

// Counts behind coverage, power and bias (Morris, White and Crowther 2019, Stat. Med. 38:2074,
// Table 6: coverage = share of intervals containing θ; power = share excluding 0). Worked by hand.
describe('ParameterAccumulator', () => {
  it('counts coverage (bounds inclusive), intervals excluding zero, and errors against the truth', () => {
    const a = new ParameterAccumulator('A', 'v', 'slope', 'fixed', 1, 0);
    a.add(row(1, 1.2, 0.4, 2.0), 0); // covers 1, excludes 0
    a.add(row(2, 0.5, -0.3, 1.0), 1); // upper bound equals the truth: covered; includes 0
    a.add(row(3, 2.5, 1.5, 3.5), 2); // misses 1, excludes 0
    expect(a.rows).toBe(3);
    expect(a.covered).toBe(2);
    expect(a.excludesZero).toBe(2);
    expect(a.error.mean).toBeCloseTo((0.2 - 0.5 + 1.5) / 3, 15);
    expect(a.squaredError.mean).toBeCloseTo((0.04 + 0.25 + 2.25) / 3, 15);
    expect(a.width.mean).toBeCloseTo((1.6 + 1.3 + 2.0) / 3, 15);
    expect(a.truthVaries).toBe(false);
  });

  it('keeps unusable rows in the row count only, and reports what was dropped from which metric', () => {
    const a = new ParameterAccumulator('A', 'v', 'slope', 'fixed', 1, 0);
    a.add(row(1, NaN, NaN, NaN, { status: 'failed' }), 0);
    a.add(row(2, NaN, NaN, NaN, { status: 'aliased' }), 1);
    a.add(row(3, NaN, NaN, NaN), 2); // usable status but no estimate
    a.add(row(4, 1.1, NaN, NaN, { se: NaN }), 3); // estimate without se or interval
    a.add(row(5, 0.9, 0.1, 1.7, { status: 'singular' }), 4);
    expect([a.rows, a.unusable, a.aliased, a.nonFiniteEstimates, a.missingSe, a.missingInterval]).toEqual([5, 2, 1, 1, 1, 1]);
    expect(a.estimate.n).toBe(2);
    expect(a.seSquared.n).toBe(1);
    expect(a.errorWithSe.n).toBe(1);
    expect(a.width.n).toBe(1);
  });

  it('notices a truth that varies by replicate, and refuses a mixed kind or a non-finite truth', () => {
    const a = new ParameterAccumulator('A', 'v', 'slope', 'fixed', 1, 0);
    a.add(row(1, 1.5, 0, 3, { truth: 2 }), 5);
    expect(a.truthVaries).toBe(true);
    expect(a.error.mean).toBeCloseTo(-0.5, 15);
    expect(() => a.add(row(2, 1, 0, 2, { kind: 'sd' }), 6)).toThrow(/replicate row 6: field 'kind' is 'sd' but row 0 .* has 'fixed'/);
    expect(() => a.add(row(3, 1, 0, 2, { truth: NaN }), 7)).toThrow(/field 'truth' must be a finite number/);
  });

  it('keeps every SD estimate for the median, growing its buffer past 64', () => {
    const a = new ParameterAccumulator('A', 'v', 'site', 'sd', 0.5, 0);
    for (let i = 0; i < 150; i++) a.add(row(i, i / 100, NaN, NaN, { kind: 'sd', truth: 0.5, parameter: 'site' }), i);
    expect(a.valueCount).toBe(150);
    expect(a.values[149]).toBe(1.49);
    expect(new ParameterAccumulator('A', 'v', 'x', 'fixed', 0, 0).values).toHaveLength(0);
  });
});

describe('FitStatusAccumulator', () => {
  it('gives each replicate its most severe status and counts replicates per status', () => {
    const f = new FitStatusAccumulator('A', 'v');
    f.add(1, 'ok');
    f.add(1, 'singular');
    f.add(1, 'aliased'); // concerns one parameter, not the fit
    f.add(2, 'ok');
    f.add(3, 'nonconverged');
    f.add(3, 'ok');
    f.add(4, 'failed', 'design matrix singular');
    f.add(5, 'failed');
    f.add(2, 'singular'); // rows of a replicate need not arrive together
    expect(f.replicates).toBe(5);
    expect(f.countAt(0)).toBe(0);
    expect(f.countAt(SEVERITY_SINGULAR)).toBe(2);
    expect(f.countAt(SEVERITY_NONCONVERGED)).toBe(1);
    expect(f.countAt(SEVERITY_FAILED)).toBe(2);
  });

  it('lists failure reasons by count, most common first, ties in first-seen order', () => {
    const f = new FitStatusAccumulator('A', 'v');
    f.add(1, 'failed', 'b');
    f.add(2, 'failed', 'a');
    f.add(3, 'failed', 'a');
    f.add(4, 'failed', 'c');
    f.add(4, 'failed', 'd'); // only the first reason of a replicate counts
    f.add(5, 'failed');
    expect(f.failureReasons()).toEqual([['a', 2], ['b', 1], ['c', 1], ['no reason given', 1]]);
  });
});
