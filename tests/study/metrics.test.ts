import { describe, expect, it } from 'vitest';
import seedrandom from 'seedrandom';
import { type ReplicateRow, type ReplicateStatus } from '../../kernel-lib/study/replicate-row';
import { type MetricName, type MetricRow, summarise } from '../../kernel-lib/study/metrics';
import { toWideTable } from '../../kernel-lib/study/wide-table';
import { medianOfSorted, medianStandardError, sortedCopy } from '../../kernel-lib/study/quantile';

// Invented study table: scenario 'A', variants 'siteRandom' (6 replicates) and 'siteFixed'
// (3 replicates, all failed). Replicate 2 is singular, 4 nonconverged, 6 failed; parameter x0 is
// aliased in replicate 3.

function row(fields: Partial<ReplicateRow> & Pick<ReplicateRow, 'replicate' | 'parameter'>): ReplicateRow {
  return {
    scenario: 'A',
    variant: 'siteRandom',
    kind: 'fixed',
    truth: 0,
    estimate: NaN,
    se: NaN,
    lower: NaN,
    upper: NaN,
    df: Infinity,
    status: 'ok',
    reason: '',
    ...fields,
  };
}

const STATUS: Record<number, ReplicateStatus> = { 1: 'ok', 2: 'singular', 3: 'ok', 4: 'nonconverged', 5: 'ok', 6: 'failed' };
const REASON: Record<number, string> = { 4: 'iteration limit reached', 6: 'design matrix empty' };

function fitRow(replicate: number, fields: Partial<ReplicateRow> & Pick<ReplicateRow, 'parameter'>): ReplicateRow {
  return row({ replicate, status: STATUS[replicate], reason: REASON[replicate] ?? '', ...fields });
}

// slope: fixed, truth 1.
const slope: [number, number, number, number][] = [
  // estimate, se, lower, upper
  [0.9, 0.2, 0.5, 1.3],
  [1.1, 0.3, 0.5, 1.7],
  [1.2, 0.2, 0.8, 1.6],
  [0.8, 0.3, -0.1, 1.7],
  [1.5, 0.25, 1.05, 1.95],
];
// x0: fixed, truth 0 (replicate 3 aliased, replicate 4 without se/interval).
const x0: [number, number, number, number][] = [
  [0.1, 0.15, -0.2, 0.4],
  [-0.3, 0.1, -0.5, -0.1],
  [NaN, NaN, NaN, NaN],
  [0.2, NaN, NaN, NaN],
  [0.0, 0.15, -0.3, 0.3],
];
// site: SD, truth 0.5, no interval method.
const site = [0.4, 0.0, 0.6, 0.5, 0.8];

function studyRows(): ReplicateRow[] {
  const rows: ReplicateRow[] = [];
  for (let r = 1; r <= 6; r++) {
    const failed = r === 6;
    const s = failed ? [NaN, NaN, NaN, NaN] : slope[r - 1];
    rows.push(fitRow(r, { parameter: 'slope', truth: 1, estimate: s[0], se: s[1], lower: s[2], upper: s[3] }));
    const x = failed ? [NaN, NaN, NaN, NaN] : x0[r - 1];
    const aliased = r === 3;
    rows.push(
      fitRow(r, {
        parameter: 'x0',
        truth: 0,
        estimate: x[0],
        se: x[1],
        lower: x[2],
        upper: x[3],
        ...(aliased ? { status: 'aliased' as const, reason: 'x0 is collinear with slope' } : {}),
      }),
    );
    rows.push(fitRow(r, { parameter: 'site', kind: 'sd', truth: 0.5, estimate: failed ? NaN : site[r - 1] }));
  }
  for (let r = 1; r <= 3; r++) {
    for (const parameter of ['slope', 'x0']) {
      rows.push(row({ variant: 'siteFixed', replicate: r, parameter, status: 'failed', reason: 'not estimable' }));
    }
  }
  return rows;
}

function pick(metrics: MetricRow[], variant: string, parameter: string, metric: MetricName): MetricRow {
  const found = metrics.filter((m) => m.variant === variant && m.parameter === parameter && m.metric === metric);
  if (found.length !== 1) throw new Error(`expected one ${variant}/${parameter}/${metric}, found ${found.length}`);
  return found[0];
}

function has(metrics: MetricRow[], variant: string, parameter: string, metric: MetricName): boolean {
  return metrics.some((m) => m.variant === variant && m.parameter === parameter && m.metric === metric);
}

function expectMetric(m: MetricRow, value: number, mcse: number, n: number): void {
  expect(m.value).toBeCloseTo(value, 10);
  expect(m.mcse).toBeCloseTo(mcse, 10);
  expect(m.n).toBe(n);
}

describe('summarise: hand-computed metrics on a 6-replicate table', () => {
  const metrics = summarise(studyRows());

  it('fixed effect with truth 1 (slope): estimate-based metrics', () => {
    // Replicates 1-5 used (6 failed). Sum 0.9+1.1+1.2+0.8+1.5 = 5.5, mean 1.1, bias 0.1.
    // Deviations -0.2, 0, 0.1, -0.3, 0.4; squares sum 0.04+0+0.01+0.09+0.16 = 0.30; var 0.30/4 = 0.075.
    // Bias MCSE = EmpSE/sqrt(n) = sqrt(0.075/5) (Morris et al. 2019, Table 6, bias).
    expectMetric(pick(metrics, 'siteRandom', 'slope', 'mean'), 1.1, Math.sqrt(0.075 / 5), 5);
    expectMetric(pick(metrics, 'siteRandom', 'slope', 'bias'), 0.1, Math.sqrt(0.075 / 5), 5);
    // Relative bias 0.1/1, MCSE divided by |truth| = 1 (Morris et al. 2019, §5.2).
    expectMetric(pick(metrics, 'siteRandom', 'slope', 'relativeBias'), 0.1, Math.sqrt(0.075 / 5), 5);
    // EmpSE = sqrt(0.075) = 0.27386; MCSE EmpSE/sqrt(2(n-1)) = sqrt(0.075)/sqrt(8) (Morris et al. 2019, Table 6).
    expectMetric(pick(metrics, 'siteRandom', 'slope', 'empiricalSE'), Math.sqrt(0.075), Math.sqrt(0.075) / Math.sqrt(8), 5);
    // Errors -0.1, 0.1, 0.2, -0.2, 0.5; squares 0.01, 0.01, 0.04, 0.04, 0.25; MSE 0.35/5 = 0.07.
    // Squares minus MSE: -0.06, -0.06, -0.03, -0.03, 0.18; their squares sum 0.0036*2 + 0.0009*2 + 0.0324 = 0.0414.
    // MCSE(MSE) = sqrt(0.0414/(5*4)) (Morris et al. 2019, Table 6, MSE); RMSE delta method: /(2 sqrt(0.07)).
    expectMetric(
      pick(metrics, 'siteRandom', 'slope', 'rmse'),
      Math.sqrt(0.07),
      Math.sqrt(0.0414 / 20) / (2 * Math.sqrt(0.07)),
      5,
    );
  });

  it('fixed effect with truth 1 (slope): model SE and its relative error', () => {
    // se^2: 0.04, 0.09, 0.04, 0.09, 0.0625; sum 0.3225, mean 0.0645; ModSE = sqrt(0.0645) = 0.25397.
    // se^2 - mean: -0.0245, 0.0255, -0.0245, 0.0255, -0.002; squares sum
    // 2*0.00060025 + 2*0.00065025 + 0.000004 = 0.002505; Var(se^2) = 0.002505/4 = 0.00062625.
    // MCSE = sqrt(0.00062625/(4*5*0.0645)) (Morris et al. 2019, Table 6, average ModSE).
    expectMetric(
      pick(metrics, 'siteRandom', 'slope', 'modelSE'),
      Math.sqrt(0.0645),
      Math.sqrt(0.00062625 / (4 * 5 * 0.0645)),
      5,
    );
    // Relative % error: 100(ModSE/EmpSE - 1) = 100(0.25397/0.27386 - 1) = -7.264; MCSE
    // 100 (ModSE/EmpSE) sqrt(0.00062625/(4*5*0.0645^2) + 1/(2*4)) = 33.76 (Morris et al. 2019, Table 6).
    const ratio = Math.sqrt(0.0645) / Math.sqrt(0.075);
    expectMetric(
      pick(metrics, 'siteRandom', 'slope', 'relativeErrorModelSE'),
      100 * (ratio - 1),
      100 * ratio * Math.sqrt(0.00062625 / (4 * 5 * 0.0645 ** 2) + 1 / 8),
      5,
    );
    expect(pick(metrics, 'siteRandom', 'slope', 'relativeErrorModelSE').value).toBeCloseTo(-7.264, 3);
  });

  it('fixed effect with truth 1 (slope): interval metrics and power', () => {
    // Intervals [0.5,1.3] [0.5,1.7] [0.8,1.6] [-0.1,1.7] [1.05,1.95]: 4 of 5 contain 1.
    // Coverage 0.8, MCSE sqrt(0.8*0.2/5) (Morris et al. 2019, Table 6, coverage).
    const cov = pick(metrics, 'siteRandom', 'slope', 'coverage');
    expectMetric(cov, 0.8, Math.sqrt((0.8 * 0.2) / 5), 5);
    expect(cov.nominal).toBe(0.95);
    // Widths 0.8, 1.2, 0.8, 1.8, 0.9; mean 5.5/5 = 1.1; deviations -0.3, 0.1, -0.3, 0.7, -0.2;
    // squares sum 0.09+0.01+0.09+0.49+0.04 = 0.72, var 0.18; MCSE sqrt(0.18/5) (MCSE of a mean, Table 6 bias row).
    expectMetric(pick(metrics, 'siteRandom', 'slope', 'width'), 1.1, Math.sqrt(0.18 / 5), 5);
    // 4 of 5 intervals exclude 0 (replicate 4 does not): power 0.8, MCSE sqrt(0.8*0.2/5) (Table 6, power).
    expectMetric(pick(metrics, 'siteRandom', 'slope', 'power'), 0.8, Math.sqrt((0.8 * 0.2) / 5), 5);
    expect(has(metrics, 'siteRandom', 'slope', 'typeIError')).toBe(false);
  });

  it('fixed effect with truth 0 (x0): typeIError, no relativeBias, exclusions counted in n', () => {
    // Usable estimates 0.1, -0.3, 0.2, 0.0 (3 aliased, 6 failed): mean 0, squares 0.01+0.09+0.04+0 = 0.14,
    // var 0.14/3; bias MCSE sqrt(0.14/3/4) (Morris et al. 2019, Table 6).
    expectMetric(pick(metrics, 'siteRandom', 'x0', 'bias'), 0, Math.sqrt(0.14 / 3 / 4), 4);
    expect(has(metrics, 'siteRandom', 'x0', 'relativeBias')).toBe(false);
    expect(pick(metrics, 'siteRandom', 'x0', 'bias').note).toContain('truth is 0');
    // MSE = 0.14/4 = 0.035; squares minus MSE -0.025, 0.055, 0.005, -0.035; their squares sum
    // 0.000625+0.003025+0.000025+0.001225 = 0.0049; MCSE(MSE) = sqrt(0.0049/(4*3)); RMSE delta method.
    expectMetric(
      pick(metrics, 'siteRandom', 'x0', 'rmse'),
      Math.sqrt(0.035),
      Math.sqrt(0.0049 / 12) / (2 * Math.sqrt(0.035)),
      4,
    );
    // Intervals in replicates 1, 2, 5 only (4 has NaN): [-0.2,0.4] [-0.5,-0.1] [-0.3,0.3].
    // Type I error 1/3 (replicate 2 excludes 0), MCSE sqrt((1/3)(2/3)/3) = sqrt(2/27) (Table 6, power).
    const t1 = pick(metrics, 'siteRandom', 'x0', 'typeIError');
    expectMetric(t1, 1 / 3, Math.sqrt(2 / 27), 3);
    expect(t1.nominal).toBeCloseTo(0.05, 12);
    expect(t1.note).toContain('1 row(s) without a finite interval excluded');
    expect(has(metrics, 'siteRandom', 'x0', 'power')).toBe(false);
    // Replicate 4 has an estimate but no interval: its own share 1/4 of the 4 usable estimates, binomial
    // MCSE sqrt((1/4)(3/4)/4) (Morris et al. 2019, Table 6), and never counted as covered.
    expectMetric(pick(metrics, 'siteRandom', 'x0', 'noIntervalShare'), 1 / 4, Math.sqrt(3 / 64), 4);
    expect(has(metrics, 'siteRandom', 'slope', 'noIntervalShare')).toBe(false);
    // Coverage 2/3 (replicate 2 misses 0); widths 0.6, 0.4, 0.6, mean 1.6/3, squares of deviations
    // (1/15)^2 + (2/15)^2 + (1/15)^2 = 6/225, var 3/225, MCSE sqrt(3/225/3) = 1/15.
    expectMetric(pick(metrics, 'siteRandom', 'x0', 'coverage'), 2 / 3, Math.sqrt(2 / 27), 3);
    expectMetric(pick(metrics, 'siteRandom', 'x0', 'width'), 1.6 / 3, 1 / 15, 3);
  });

  it('fixed effect with truth 0 (x0): model SE over the rows that have an se', () => {
    // se 0.15, 0.1, 0.15 (replicates 1, 2, 5): se^2 0.0225, 0.01, 0.0225, mean 0.055/3.
    // Deviations 0.0125/3, -0.025/3, 0.0125/3; squares sum (0.00015625*2 + 0.000625)/9 = 0.0009375/9;
    // Var(se^2) = 0.0009375/18. MCSE sqrt(Var/(4*3*0.055/3)) (Morris et al. 2019, Table 6).
    const varSe2 = 0.0009375 / 18;
    const modSE = pick(metrics, 'siteRandom', 'x0', 'modelSE');
    expectMetric(modSE, Math.sqrt(0.055 / 3), Math.sqrt(varSe2 / (4 * 0.055)), 3);
    expect(modSE.note).toContain('1 row(s) without a finite se excluded');
    // EmpSE over the same replicates: estimates 0.1, -0.3, 0.0, mean -0.2/3; deviations 0.5/3, -0.7/3, 0.2/3;
    // squares sum 0.78/9, var 0.39/9. Relative error 100(ModSE/EmpSE - 1) = -34.96 and MCSE
    // 100 (ModSE/EmpSE) sqrt(Var/(4*3*ModSE^4) + 1/(2*2)) (Morris et al. 2019, Table 6).
    const ratio = Math.sqrt(0.055 / 3) / Math.sqrt(0.39 / 9);
    expectMetric(
      pick(metrics, 'siteRandom', 'x0', 'relativeErrorModelSE'),
      100 * (ratio - 1),
      100 * ratio * Math.sqrt(varSe2 / (12 * (0.055 / 3) ** 2) + 1 / 4),
      3,
    );
  });

  it('SD parameter (site): sdMean, sdMedian, sdRMSE; no interval metrics without intervals', () => {
    // Estimates 0.4, 0.0, 0.6, 0.5, 0.8: mean 2.3/5 = 0.46; deviations -0.06, -0.46, 0.14, 0.04, 0.34;
    // squares sum 0.0036+0.2116+0.0196+0.0016+0.1156 = 0.352, var 0.088; MCSE sqrt(0.088/5) (Table 6, bias).
    expectMetric(pick(metrics, 'siteRandom', 'site', 'sdMean'), 0.46, Math.sqrt(0.088 / 5), 5);
    expectMetric(pick(metrics, 'siteRandom', 'site', 'bias'), -0.04, Math.sqrt(0.088 / 5), 5);
    expectMetric(pick(metrics, 'siteRandom', 'site', 'relativeBias'), -0.08, Math.sqrt(0.088 / 5) / 0.5, 5);
    expectMetric(pick(metrics, 'siteRandom', 'site', 'empiricalSE'), Math.sqrt(0.088), Math.sqrt(0.088 / 8), 5);
    // Sorted 0, 0.4, 0.5, 0.6, 0.8: median 0.5. Order-statistic MCSE (Conover 1999 §3.2; McKean and
    // Schrader 1984): c = round(3 - 1.96*sqrt(5/4)) = round(0.809) = 1, so (x(5) - x(1))/(2*1.96) = 0.8/3.92.
    expectMetric(pick(metrics, 'siteRandom', 'site', 'sdMedian'), 0.5, 0.8 / (2 * 1.959963984540054), 5);
    // Errors -0.1, -0.5, 0.1, 0, 0.3; squares 0.01, 0.25, 0.01, 0, 0.09; MSE 0.36/5 = 0.072.
    // Squares minus MSE -0.062, 0.178, -0.062, -0.072, 0.018; their squares sum
    // 0.003844+0.031684+0.003844+0.005184+0.000324 = 0.04488; MCSE(MSE) = sqrt(0.04488/20) (Table 6, MSE).
    expectMetric(
      pick(metrics, 'siteRandom', 'site', 'sdRMSE'),
      Math.sqrt(0.072),
      Math.sqrt(0.04488 / 20) / (2 * Math.sqrt(0.072)),
      5,
    );
    for (const absent of ['mean', 'rmse', 'modelSE', 'coverage', 'width', 'power', 'typeIError'] as const) {
      expect(has(metrics, 'siteRandom', 'site', absent)).toBe(false);
    }
  });

  it('share metrics per scenario x variant, counting failed replicates', () => {
    // 6 replicates; one each singular, nonconverged, failed: 1/6 with MCSE sqrt((1/6)(5/6)/6) = sqrt(5/216)
    // (binomial MCSE, Morris et al. 2019, Table 6, coverage/power row).
    for (const metric of ['singularShare', 'nonconvergedShare', 'failureShare'] as const) {
      const m = pick(metrics, 'siteRandom', '*', metric);
      expectMetric(m, 1 / 6, Math.sqrt(5 / 216), 6);
      expect(m.kind).toBe('fit');
    }
  });

  it('all replicates failed: shares only, failure share 1 with a boundary note', () => {
    const fixed = metrics.filter((m) => m.variant === 'siteFixed');
    expect(fixed.map((m) => m.metric).sort()).toEqual(['failureShare', 'nonconvergedShare', 'singularShare']);
    const failure = pick(metrics, 'siteFixed', '*', 'failureShare');
    expectMetric(failure, 1, 0, 3);
    expect(failure.note).toContain('binomial MCSE is 0');
    expectMetric(pick(metrics, 'siteFixed', '*', 'singularShare'), 0, 0, 3);
  });

  it('never emits a NaN value', () => {
    expect(metrics.filter((m) => Number.isNaN(m.value))).toEqual([]);
    // A NaN MCSE only where the note says why.
    for (const m of metrics) if (Number.isNaN(m.mcse)) expect(m.note).toBeTruthy();
  });
});

describe('summarise: edge cases and bad input', () => {
  it('empty input gives no metrics', () => {
    expect(summarise([])).toEqual([]);
  });

  it('a single usable replicate: mean reported with an explained NaN MCSE, empiricalSE omitted', () => {
    const m = summarise([row({ replicate: 1, parameter: 'b', truth: 2, estimate: 2.5, se: 0.1, lower: 2.3, upper: 2.7 })]);
    const bias = m.find((x) => x.metric === 'bias')!;
    expect(bias.value).toBeCloseTo(0.5, 12);
    expect(Number.isNaN(bias.mcse)).toBe(true);
    expect(bias.note).toContain('n < 2');
    expect(m.some((x) => x.metric === 'empiricalSE' || x.metric === 'relativeErrorModelSE')).toBe(false);
    expect(m.find((x) => x.metric === 'coverage')!.value).toBe(0);
  });

  it('identical estimates: EmpSE 0, relativeErrorModelSE omitted with a note', () => {
    const rows = [1, 2, 3].map((r) => row({ replicate: r, parameter: 'b', truth: 1, estimate: 1, se: 0.2, lower: 0.6, upper: 1.4 }));
    const m = summarise(rows);
    expect(m.find((x) => x.metric === 'empiricalSE')!.value).toBe(0);
    expect(m.some((x) => x.metric === 'relativeErrorModelSE')).toBe(false);
    expect(m.find((x) => x.metric === 'modelSE')!.note).toContain('EmpSE is 0');
  });

  it('status aliased or failed excludes a finite estimate too', () => {
    const rows = [
      row({ replicate: 1, parameter: 'b', estimate: 1 }),
      row({ replicate: 2, parameter: 'b', estimate: 3 }),
      row({ replicate: 3, parameter: 'b', estimate: 100, status: 'aliased', reason: 'collinear' }),
    ];
    const m = summarise(rows);
    expect(m.find((x) => x.metric === 'mean')).toMatchObject({ value: 2, n: 2 });
  });

  it('a usable status with a NaN estimate is excluded and reported', () => {
    const rows = [1, 2, 3].map((r) => row({ replicate: r, parameter: 'b', estimate: r === 2 ? NaN : r }));
    const mean = summarise(rows).find((x) => x.metric === 'mean')!;
    expect(mean).toMatchObject({ value: 2, n: 2 });
    expect(mean.note).toContain('non-finite estimate excluded');
  });

  it('rejects malformed rows, naming row and field', () => {
    const good = row({ replicate: 1, parameter: 'b', estimate: 1 });
    expect(() => summarise([good, { ...good, replicate: 2, status: 'broken' as ReplicateStatus }])).toThrow(
      /replicate row 1: field 'status'/,
    );
    expect(() => summarise([{ ...good, estimate: '1' as unknown as number }])).toThrow(/row 0: field 'estimate'/);
    expect(() => summarise([{ ...good, se: -1 }])).toThrow(/row 0: field 'se'/);
    expect(() => summarise([{ ...good, lower: 2, upper: 1 }])).toThrow(/row 0: field 'lower'/);
    expect(() => summarise([good, { ...good, replicate: 2, truth: NaN }])).toThrow(/row 1: field 'truth'/);
    expect(() => summarise([good, { ...good, replicate: 2, kind: 'sd' }])).toThrow(/row 1: field 'kind'/);
    expect(() => summarise([good, { ...good }])).toThrow(/at most one row per replicate/);
  });

  // A random factor entered as fixed: its coefficients estimate this replicate's realised effects,
  // so each row carries its own truth. Hand computation (Morris et al. 2019, Table 6, with the
  // error est_i − truth_i in place of est_i − θ): errors 0.5 and 0 -> bias 0.25, MCSE sd(0.5, 0)/√2
  // = 0.353553/1.414214 = 0.25; coverage: [0.8, 1.2] misses 0.5, [2, 4] holds 3 -> 0.5.
  it('uses each row\'s truth when the target varies by replicate', () => {
    const a = row({ replicate: 1, parameter: 'year=y2', estimate: 1, truth: 0.5, se: 0.1, lower: 0.8, upper: 1.2 });
    const b = row({ replicate: 2, parameter: 'year=y2', estimate: 3, truth: 3, se: 0.5, lower: 2, upper: 4 });
    const metrics = summarise([a, b]);
    const bias = metrics.find((m) => m.metric === 'bias')!;
    expect(bias.value).toBeCloseTo(0.25, 12);
    expect(bias.mcse).toBeCloseTo(0.25, 12);
    expect(bias.note).toContain('target varies');
    expect(metrics.find((m) => m.metric === 'coverage')!.value).toBe(0.5);
    expect(metrics.some((m) => m.metric === 'relativeBias')).toBe(false);
  });

  it('rejects inconsistent options', () => {
    expect(() => summarise([], { level: 1.2 })).toThrow(/options.level/);
    expect(() => summarise([], { level: 0.9, alpha: 0.05 })).toThrow(/options.alpha/);
    const t1 = summarise([row({ replicate: 1, parameter: 'b', estimate: 1, lower: 0.5, upper: 1.5 })], { level: 0.9 });
    expect(t1.find((x) => x.metric === 'typeIError')!.nominal).toBeCloseTo(0.1, 12);
    expect(t1.find((x) => x.metric === 'coverage')!.nominal).toBe(0.9);
  });
});

describe('median and its order-statistic standard error', () => {
  it('median of odd and even samples', () => {
    expect(medianOfSorted(sortedCopy(new Float64Array([3, 1, 2])))).toBe(2);
    expect(medianOfSorted(sortedCopy(new Float64Array([4, 1, 3, 2])))).toBe(2.5);
  });

  it('matches the normal-theory asymptote sqrt(pi/2) sigma/sqrt(n) on normal data', () => {
    // Asymptotic variance of the sample median is 1/(4 n f(median)^2) = pi sigma^2/(2n) for normal data
    // (textbook identity, e.g. Serfling 1980, Approximation Theorems of Mathematical Statistics, §2.3).
    const rng = seedrandom('median-se');
    const n = 20000;
    const sigma = 0.7;
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) x[i] = 3 + sigma * normal(rng);
    const se = medianStandardError(sortedCopy(x)).se;
    const asymptotic = (Math.sqrt(Math.PI / 2) * sigma) / Math.sqrt(n);
    // Order-statistic estimator uses ~280 spacings: relative SD ~6%, so 20% is > 3 SD.
    expect(Math.abs(se / asymptotic - 1)).toBeLessThan(0.2);
  });
});

/** Standard normal draw by Box-Muller (Box and Muller 1958, Ann. Math. Statist. 29:610-611). */
function normal(rng: () => number): number {
  const u = 1 - rng();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rng());
}

describe('property: simulated normal intervals with known sigma', () => {
  // est ~ N(truth, sigma^2), interval est +/- 1.96 sigma: coverage 0.95 and, at truth 0, type I error
  // 0.05, each within 3 MCSE (common practice, no source).
  const rng = seedrandom('coverage-property');
  const sigma = 0.4;
  const z = 1.959963984540054;
  const rows: ReplicateRow[] = [];
  const n = 4000;
  for (let r = 1; r <= n; r++) {
    for (const [parameter, truth] of [
      ['effect', 1.5],
      ['null', 0],
    ] as const) {
      const est = truth + sigma * normal(rng);
      rows.push(row({ replicate: r, parameter, truth, estimate: est, se: sigma, lower: est - z * sigma, upper: est + z * sigma }));
    }
  }
  const metrics = summarise(rows);

  it('coverage within 3 MCSE of 0.95', () => {
    for (const parameter of ['effect', 'null']) {
      const cov = pick(metrics, 'siteRandom', parameter, 'coverage');
      expect(cov.n).toBe(n);
      expect(Math.abs(cov.value - 0.95)).toBeLessThan(3 * cov.mcse);
    }
  });

  it('type I error within 3 MCSE of 0.05; power near its normal-theory value', () => {
    const t1 = pick(metrics, 'siteRandom', 'null', 'typeIError');
    expect(Math.abs(t1.value - 0.05)).toBeLessThan(3 * t1.mcse);
    // Power of a two-sided z test at effect/sigma = 3.75: Phi(3.75 - 1.96) + Phi(-3.75 - 1.96) = 0.96328
    // (normal-theory power; value from scipy.stats.norm.cdf).
    const power = pick(metrics, 'siteRandom', 'effect', 'power');
    expect(Math.abs(power.value - 0.9633)).toBeLessThan(3 * power.mcse);
  });

  it('bias, EmpSE and relative error in ModSE are consistent with the truth within 3 MCSE', () => {
    const bias = pick(metrics, 'siteRandom', 'effect', 'bias');
    expect(Math.abs(bias.value)).toBeLessThan(3 * bias.mcse);
    const emp = pick(metrics, 'siteRandom', 'effect', 'empiricalSE');
    expect(Math.abs(emp.value - sigma)).toBeLessThan(3 * emp.mcse);
    const mod = pick(metrics, 'siteRandom', 'effect', 'modelSE');
    expect(mod.value).toBeCloseTo(sigma, 12);
    expect(mod.mcse).toBe(0); // constant se: Var(se^2) = 0
    const rel = pick(metrics, 'siteRandom', 'effect', 'relativeErrorModelSE');
    expect(Math.abs(rel.value)).toBeLessThan(3 * rel.mcse);
    // rmse^2 = bias^2 + EmpSE^2 (n-1)/n exactly: MSE decomposition (Morris et al. 2019, §5.2).
    const rmse = pick(metrics, 'siteRandom', 'effect', 'rmse');
    expect(rmse.value ** 2).toBeCloseTo(bias.value ** 2 + (emp.value ** 2 * (n - 1)) / n, 12);
  });
});

describe('summarise at scale', () => {
  it('handles 1,000,000 rows (20 scenarios x 2 variants x 10 parameters x 2500 replicates) with the right counts per cell', () => {
    const rows: ReplicateRow[] = [];
    const rng = seedrandom('scale');
    for (let s = 0; s < 20; s++) {
      for (const variant of ['siteRandom', 'siteFixed']) {
        for (let r = 1; r <= 2500; r++) {
          for (let p = 0; p < 10; p++) {
            const est = p + normal(rng);
            rows.push(
              row({
                scenario: `s${s}`,
                variant,
                replicate: r,
                parameter: `p${p}`,
                kind: p < 8 ? 'fixed' : 'sd',
                truth: p,
                estimate: est,
                se: 1,
                lower: est - 1.96,
                upper: est + 1.96,
              }),
            );
          }
        }
      }
    }
    // Speed at this size is measured by the benchmark, not here (no timed tests).
    const metrics = summarise(rows);
    expect(pick(metrics.filter((m) => m.scenario === 's7'), 'siteFixed', 'p9', 'sdMedian').n).toBe(2500);
    expect(metrics.filter((m) => m.metric === 'failureShare')).toHaveLength(40);
  });
});

describe('toWideTable', () => {
  it('pivots to one row per scenario x variant x parameter', () => {
    const wide = toWideTable(summarise(studyRows()));
    expect(wide.map((w) => `${w.variant}/${w.parameter}`)).toEqual([
      'siteRandom/*',
      'siteRandom/slope',
      'siteRandom/x0',
      'siteRandom/site',
      'siteFixed/*',
    ]);
    const slopeRow = wide[1];
    expect(slopeRow.coverage).toBeCloseTo(0.8, 12);
    expect(slopeRow.coverageMcse).toBeCloseTo(Math.sqrt(0.032), 12);
    expect(slopeRow.coverageN).toBe(5);
    expect('typeIError' in slopeRow).toBe(false);
  });
});

describe('summarise: a target that varies by replicate (hand-computed)', () => {
  // Four replicates of a coefficient whose target is the replicate's realised value.
  // truth 10, 12, 9, 11; estimate 10.5, 11, 9.5, 12; se 0.6, 0.5, 0.7, 0.4; errors 0.5, -1, 0.5, 1.
  const truths = [10, 12, 9, 11];
  const estimates = [10.5, 11, 9.5, 12];
  const ses = [0.6, 0.5, 0.7, 0.4];
  const rows = truths.map((t, i) =>
    row({ replicate: i + 1, parameter: 'intercept', truth: t, estimate: estimates[i], se: ses[i], lower: estimates[i] - 2 * ses[i], upper: estimates[i] + 2 * ses[i] }),
  );
  const metrics = summarise(rows);

  it('takes EmpSE and the relative error of the model SE from the spread of estimate - truth', () => {
    // Morris, White and Crowther 2019, Table 6, with θ̂_i − θ_i in place of θ̂_i (hand arithmetic):
    // mean error 0.25, squared deviations 0.0625 + 1.5625 + 0.0625 + 0.5625 = 2.25, EmpSE sqrt(2.25/3) = 0.866025,
    // MCSE EmpSE/sqrt(2·3) = 0.353553.
    expectMetric(pick(metrics, 'siteRandom', 'intercept', 'empiricalSE'), 0.8660254037844386, 0.3535533905932738, 4);
    // ModSE sqrt((0.36 + 0.25 + 0.49 + 0.16)/4) = sqrt(0.315) = 0.561249; relative error 100(0.561249/0.866025 − 1)
    // = −35.1926%; MCSE 100·ratio·sqrt(Var(se²)/(4·4·ModSE⁴) + 1/(2·3)) with Var(se²) = 0.0609/3 = 0.0203.
    expectMetric(pick(metrics, 'siteRandom', 'intercept', 'modelSE'), 0.5612486080160911, Math.sqrt(0.0203 / (4 * 4 * 0.315)), 4);
    expectMetric(pick(metrics, 'siteRandom', 'intercept', 'relativeErrorModelSE'), -35.1925930159214, 27.453664668012966, 4);
  });

  it('gives the mean estimate the MCSE of the estimates and the bias that of the errors', () => {
    // Mean 10.75; squared deviations of the estimates 0.0625 + 0.0625 + 1.5625 + 1.5625 = 3.25:
    // MCSE sqrt(3.25/3/4) = 0.520416. Bias 0.25 with MCSE sqrt(0.75/4) = 0.433013 (Morris et al. 2019, Table 6).
    expectMetric(pick(metrics, 'siteRandom', 'intercept', 'mean'), 10.75, 0.5204164998665332, 4);
    expectMetric(pick(metrics, 'siteRandom', 'intercept', 'bias'), 0.25, 0.4330127018922193, 4);
  });
});

describe('summarise: coefficients not estimable and variant levels', () => {
  it('gives an aliased coefficient a not-estimable share, and a note when only some replicates are aliased', () => {
    const metrics = summarise(studyRows());
    // x0 is aliased in replicate 3 of the 5 replicates whose fit ran (replicate 6 failed): share 1/5,
    // binomial MCSE sqrt(p(1-p)/5) (Morris et al. 2019, Table 6).
    const share = pick(metrics, 'siteRandom', 'x0', 'notEstimableShare');
    expectMetric(share, 1 / 5, Math.sqrt((1 / 5) * (4 / 5) / 5), 5);
    expect(pick(metrics, 'siteRandom', 'x0', 'bias').note).toMatch(/not estimable in 1 of 5 replicates \(20\.0%\)/);
    // A coefficient aliased in every replicate still has a row that says so.
    const always = [1, 2, 3].map((r) => row({ replicate: r, parameter: 'elevation', truth: 1.5, status: 'aliased', reason: 'not estimable' }));
    const m = summarise(always);
    const row0 = pick(m, 'siteRandom', 'elevation', 'notEstimableShare');
    expect(row0.value).toBe(1);
    expect(row0.note).toMatch(/not estimable: aliased with other columns in every replicate/);
    expect(m.filter((x) => x.parameter === 'elevation').map((x) => x.metric)).toEqual(['notEstimableShare']);
  });

  it("compares coverage with each variant's own level and type I error with 1 - level", () => {
    const rows = [1, 2, 3].flatMap((r) => ['a', 'b'].map((variant) => row({ variant, replicate: r, parameter: 'x', truth: 0, estimate: 0.1 * r, se: 0.1, lower: 0.1 * r - 0.15, upper: 0.1 * r + 0.15 })));
    const m = summarise(rows, { levels: { A: { a: 0.9 } } });
    // common practice, no source: a 90% interval is judged against 0.9, and its test has size 0.1
    expect(m.find((x) => x.variant === 'a' && x.metric === 'coverage')!.nominal).toBe(0.9);
    expect(m.find((x) => x.variant === 'a' && x.metric === 'typeIError')!.nominal).toBeCloseTo(0.1, 12);
    expect(m.find((x) => x.variant === 'b' && x.metric === 'coverage')!.nominal).toBe(0.95);
    expect(() => summarise(rows, { levels: { A: { a: 1.5 } } })).toThrow(/options.levels/);
  });
});
