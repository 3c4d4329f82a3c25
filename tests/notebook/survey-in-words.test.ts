import { describe, expect, it } from 'vitest';
import { describeSurvey } from '../../kernel-lib/data/describe-survey';
import { FEW_LEVELS, factorRows, pairRows, surveySentences } from '../../kernel-lib/notebook/survey-in-words';

// Invented survey: 3 sites × 2 years, site C never visited in 2022, one missing cover value,
// two plots nested in each site. Counts tallied by hand.
const data = {
  site: ['A', 'A', 'A', 'A', 'B', 'B', 'B', 'B', 'C', 'C'],
  year: ['2021', '2021', '2022', '2022', '2021', '2021', '2022', '2022', '2021', '2021'],
  plot: ['1', '2', '1', '2', '1', '2', '1', '2', '1', '2'],
  cover: [12, 15, 9, null, 20, 22, 18, 19, 8, 9],
};

describe('survey in words', () => {
  const summary = describeSurvey(data, ['site', 'year', 'plot'], 'cover', { plot: 'site' });

  it('one row per factor, with rows per level and a note for fewer than FEW_LEVELS levels', () => {
    const rows = factorRows(summary);
    expect(rows.map((r) => [r.factor, r.levels])).toEqual([['site', 3], ['year', 2], ['plot', 6]]);
    expect(rows[0]['rows per level']).toBe('2 to 4 (median 4)');
    expect(rows[2]['rows per level']).toBe('1 to 2 (median 2)');
    expect(FEW_LEVELS).toBe(5); // rule of thumb named in the module (common practice, no source)
    expect(rows[0].note).toBe('only 3 levels: its SD is estimated loosely');
    expect(rows[2].note).toBe('');
  });

  it('pairs say crossed, partly crossed or nested, with the combinations never observed', () => {
    const pairs = pairRows(summary);
    const siteYear = pairs.find((p) => p.factors === 'site × year')!;
    expect(siteYear.relation).toBe('partly crossed (some combinations never observed)');
    expect(siteYear['combinations observed']).toBe('5 of 6');
    expect(siteYear['never observed']).toBe(1);
    const sitePlot = pairs.find((p) => p.factors.includes('site') && p.factors.includes('plot'))!;
    expect(sitePlot.relation).toMatch(/plot nested in site/);
    expect(sitePlot['never observed']).toBe('–');
  });

  it('sentences: size, missing responses (with their share), balance, empty combinations, few levels', () => {
    const s = surveySentences(summary, 'cover');
    expect(s[0]).toBe('10 rows; 3 site levels, 2 year levels, 6 plot levels.');
    expect(s[1]).toBe('1 value of `cover` is missing (10.0%); that row is left out of fits.');
    expect(s.some((l) => l.startsWith('Unbalanced:'))).toBe(true);
    expect(s).toContain('`site` and `year`: 1 of 6 combinations were never observed.');
    expect(s[s.length - 1]).toMatch(/^`site` \(3\), `year` \(2\): fewer than 5 levels\./);
  });
});
