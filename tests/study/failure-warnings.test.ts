import { describe, expect, it } from 'vitest';
import { failureWarnings } from '../../kernel-lib/study/failure-warnings';
import type { MetricRow } from '../../kernel-lib/study/metrics';

const share = (variant: string, value: number, n: number, note?: string): MetricRow => ({
  scenario: 'A', variant, parameter: '*', kind: 'fit', metric: 'failureShare', value, mcse: 0, n, note,
});

// Failed fits must be said, not hidden (project rule: degenerate data reported with a reason).
// Counts and percentages below are worked by hand.
describe('failureWarnings', () => {
  it('one sentence per variant with failures: count, share and the reasons', () => {
    const rows: MetricRow[] = [
      share('siteFixed', 0.125, 40, 'proportion is of all replicates; design matrix singular (5)'),
      share('siteRandom', 0, 40),
      { ...share('siteRandom', 0.5, 40), metric: 'singularShare' },
    ];
    const w = failureWarnings(rows);
    expect(w).toHaveLength(1);
    expect(w[0]).toMatch(/^variant "siteFixed" \(scenario A\): 5 of 40 fits failed \(12\.5%\); design matrix singular \(5\)\. /);
    expect(w[0]).not.toContain('proportion is');
    expect(w[0]).toMatch(/only the data sets that could be fitted/);
  });

  it('no reasons clause when the note has none, nothing when no fit failed', () => {
    expect(failureWarnings([share('v', 1, 3)])[0]).toMatch(/3 of 3 fits failed \(100\.0%\)\. Metrics/);
    expect(failureWarnings([share('v', 0, 3), share('w', NaN, 0)])).toEqual([]);
  });

  it('names the scenario by its readable label when given one', () => {
    const labels = new Map([['A', 'year levels = 3']]);
    expect(failureWarnings([share('v', 1, 3)], labels)[0]).toMatch(/^variant "v" \(scenario year levels = 3\):/);
  });
});
