import { describe, expect, it } from 'vitest';
import type { MetricRow } from '../../kernel-lib/study/metrics';
import {
  defaultTolerance, judgeCoverage, percentWithError, readStudy, readingMarkdown, readingText, roundUpCount,
} from '../../kernel-lib/study/reading';

// Hand-made metric tables. MCSE of a proportion sqrt(p(1 − p)/n): Morris, White and Crowther 2019,
// Statistics in Medicine 38:2074, Table 6. Floor of kept coverage for 95% intervals: 0.95 − 0.025 =
// 0.925, Bradley's liberal criterion (Bradley 1978, Br. J. Math. Stat. Psychol. 31:144).
const N = 1000;
function cov(scenario: string, variant: string, value: number, parameter = 'grazing=ungrazed', nominal = 0.95): MetricRow {
  return { scenario, variant, parameter, kind: 'fixed', metric: 'coverage', value, mcse: Math.sqrt((value * (1 - value)) / N), n: N, nominal };
}
function other(scenario: string, variant: string, metric: 'width' | 'rmse' | 'power', value: number, mcse: number, parameter = 'grazing=ungrazed'): MetricRow {
  return { scenario, variant, parameter, kind: 'fixed', metric, value, mcse, n: N };
}
const scenarios = [
  { index: 0, key: 'factors.year.levels=3', values: { 'factors.year.levels': 3 } },
  { index: 1, key: 'factors.year.levels=8', values: { 'factors.year.levels': 8 } },
];

describe('judgeCoverage', () => {
  it('covers: 0.95 − 2·0.00689 = 0.936 ≥ 0.925 (hand computation)', () => {
    const j = judgeCoverage(cov('s', 'v', 0.95));
    expect(j.class).toBe('covers');
    expect(j.moreReplicates).toBe(0);
    expect(j.tolerance).toBeCloseTo(0.025, 12); // Bradley 1978: half of alpha = 0.05
  });

  it('undercovers: 0.90 + 2·0.00949 = 0.919 < 0.925 (hand computation)', () => {
    expect(judgeCoverage(cov('s', 'v', 0.9)).class).toBe('undercovers');
  });

  it('undecided: 0.92 ± 2·0.00858 straddles 0.925; replicates to settle it computed by hand', () => {
    const j = judgeCoverage(cov('s', 'v', 0.92));
    expect(j.class).toBe('undecided');
    // total = (2·sqrt(0.92·0.08)/|0.92 − 0.925|)² = 4·0.0736/0.005² = 11776; 11776 − 1000 more
    expect(j.moreReplicates).toBe(10776);
    expect(roundUpCount(j.moreReplicates)).toBe(11000);
  });

  it('does not flip on a difference smaller than the Monte Carlo error (93.6% and 93.7%)', () => {
    expect(judgeCoverage(cov('s', 'v', 0.936)).class).toBe(judgeCoverage(cov('s', 'v', 0.937)).class);
    // and the two verdicts on either side are never adjacent: between them lies the undecided band
    const values = Array.from({ length: 200 }, (_, i) => 0.85 + i * 0.0005);
    const classes = values.map((v) => judgeCoverage(cov('s', 'v', v)).class);
    for (let i = 1; i < classes.length; i++) {
      expect(classes[i - 1] === 'undercovers' && classes[i] === 'covers').toBe(false);
    }
  });

  it("uses the row's own nominal level and a user tolerance", () => {
    // 90% intervals: floor 0.9 − 0.05 = 0.85; 0.88 − 2·sqrt(0.88·0.12/1000) = 0.859 ≥ 0.85
    expect(judgeCoverage(cov('s', 'v', 0.88, 'x', 0.9)).class).toBe('covers');
    expect(defaultTolerance(0.9)).toBeCloseTo(0.05, 12);
    // with a tolerance of 0.01 the floor is 0.94: 0.95 − 0.0138 = 0.936 < 0.94, 0.95 + 0.0138 ≥ 0.94
    expect(judgeCoverage(cov('s', 'v', 0.95), { tolerance: 0.01 }).class).toBe('undecided');
  });

  it('a coverage of exactly 1 uses the nominal spread, not an MCSE of 0', () => {
    const j = judgeCoverage({ ...cov('s', 'v', 1), n: 3 });
    // 1 − 2·sqrt(0.95·0.05/3) = 0.748 < 0.925 and 1.25 ≥ 0.925: three replicates settle nothing
    expect(j.class).toBe('undecided');
  });
});

describe('readStudy', () => {
  const a = 'factors.year.levels=3';
  const b = 'factors.year.levels=8';
  const metrics: MetricRow[] = [
    // 3 years: random undercovers, fixed covers; fixed costs 10% in width, 5% in RMSE
    cov(a, 'year random', 0.9),
    cov(a, 'year fixed', 0.95),
    other(a, 'year random', 'width', 2.0, 0.01),
    other(a, 'year fixed', 'width', 2.2, 0.01),
    other(a, 'year random', 'rmse', 1.0, 0.01),
    other(a, 'year fixed', 'rmse', 1.05, 0.01),
    other(a, 'year random', 'power', 0.81, 0.0124),
    other(a, 'year fixed', 'power', 0.74, 0.0139),
    // 8 years: random undecided, fixed covers: no recommendation
    cov(b, 'year random', 0.92),
    cov(b, 'year fixed', 0.95),
    other(b, 'year random', 'width', 1.5, 0.01),
    other(b, 'year fixed', 'width', 1.6, 0.01),
  ];

  it('recommends the covering variant where the other clearly undercovers, with its cost', () => {
    const r = readStudy(metrics, scenarios);
    const three = r.cells.find((c) => c.scenario === a)!;
    expect(three.recommend).toEqual(['year fixed']);
    // width 2.2/2.0 − 1 = +10%, RMSE 1.05/1.0 − 1 = +5% (hand computation)
    expect(three.text).toContain('against **year random** it costs +10% in interval width and +5% in RMSE');
    expect(three.text).toContain('undercovers by 5.0 points');
    expect(three.text).toContain('power 81% ± 1');
  });

  it('makes no recommendation while a variant is undecided, and says how many more replicates', () => {
    const r = readStudy(metrics, scenarios);
    const eight = r.cells.find((c) => c.scenario === b)!;
    expect(eight.recommend).toEqual([]);
    expect(eight.text).toContain('no clear difference at this number of replicates (need about 11000 more per scenario to tell)');
    expect(r.answers[0]).toMatch(/^`grazing=ungrazed`: \*\*year random\*\* undercovers at year levels = 3 and is not yet clear at year levels = 8/);
    expect(r.answers[0]).toContain('A recommendation holds in 1 of 2 scenarios');
  });

  it('recommends everywhere only when every scenario supports it', () => {
    const clear = metrics.map((m) => (m.scenario === b && m.variant === 'year random' && m.metric === 'coverage' ? cov(b, 'year random', 0.89) : m));
    const r = readStudy(clear, scenarios);
    expect(r.answers[0]).toContain('Recommendation: **year fixed**, supported in every scenario.');
  });

  it('between variants that all cover, recommends only a clearly narrower one', () => {
    const both = (w2: number): MetricRow[] => [
      cov(a, 'p', 0.95), cov(a, 'q', 0.95), other(a, 'p', 'width', 2.0, 0.01), other(a, 'q', 'width', w2, 0.01),
    ];
    // 2.1/2.0 − 1 = 0.05 with MCSE 1.05·sqrt(0.005² + 0.00476²) = 0.00725: clear
    expect(readStudy(both(2.1), scenarios).cells[0].recommend).toEqual(['p']);
    // 2.01/2.0 − 1 = 0.005 < 2·0.00708: not clear, and the replicates to tell are quoted
    const close = readStudy(both(2.01), scenarios).cells[0];
    expect(close.recommend).toEqual([]);
    expect(close.text).toMatch(/All keep coverage; no clear difference at this number of replicates \(need about \d+ more per scenario to tell\)/);
  });

  it('says so when no variant keeps coverage', () => {
    const r = readStudy([cov(a, 'p', 0.8), cov(a, 'q', 0.85)], scenarios);
    expect(r.cells[0].text).toContain('No variant keeps coverage here');
    expect(r.cells[0].recommend).toEqual([]);
  });

  it('defaults to the fixed effects every variant estimates, without the intercept', () => {
    const r = readStudy([...metrics, cov(a, 'year fixed', 0.5, 'intercept'), cov(a, 'year fixed', 0.95, 'year=2022')], scenarios);
    expect([...new Set(r.cells.map((c) => c.parameter))]).toEqual(['grazing=ungrazed']);
  });

  it('states the rule and the cautions, and prints plain text for a terminal', () => {
    const r = readStudy(metrics, scenarios);
    const md = readingMarkdown(r);
    expect(md).toContain('92.5% for 95% intervals');
    expect(md).toContain('simulated designs and true values only');
    expect(md).toContain('qualified statistician');
    expect(readingText(r)).not.toMatch(/\*\*|`/);
    expect(readingMarkdown(readStudy([], scenarios))).toMatch(/No intervals were studied/);
    expect(() => readStudy(metrics, scenarios, { tolerance: 0 })).toThrow(/tolerance/);
  });

  it('formats a share with the digits its MCSE supports', () => {
    expect(percentWithError(0.9123, 0.0061)).toBe('91.2% ± 0.6');
    expect(percentWithError(1, 0)).toBe('100%');
  });
});
