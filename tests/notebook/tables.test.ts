import { describe, expect, it } from 'vitest';
import * as aq from 'arquero';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { readCsvFile } from '../../kernel-lib/data/csv';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { fixedEffectsTable, groupEffectsTable, groupSdTable, metricsTable, surveyTable } from '../../kernel-lib/notebook/tables';
import type { MetricRow } from '../../kernel-lib/study/metrics';

const ROOT = join(__dirname, '..', '..');
const survey = readCsvFile(join(ROOT, 'data', 'demo-survey.csv'));
const fit = fitModel(survey, JSON.parse(readFileSync(join(ROOT, 'data', 'demo-model.json'), 'utf8')));

describe('library results as arquero tables', () => {
  it('a survey table keeps every row and column, and joins a site table with arquero', () => {
    const t = surveyTable(survey);
    expect(t.numRows()).toBe(144); // data/README.md: 6 sites × 4 years × 3 plots × 2 visits
    expect(t.columnNames()).toEqual(Object.keys(survey));
    const sites = aq.table({ site: ['ashpool', 'brackenway'], altitude: [12, 30] });
    const joined = t.join_left(sites, 'site');
    expect(joined.filter((d) => d.site === 'ashpool').array('altitude').every((v) => v === 12)).toBe(true);
    // and it goes back in: a fit of the arquero table equals the fit of the columns
    const again = fitModel(t, JSON.parse(readFileSync(join(ROOT, 'data', 'demo-model.json'), 'utf8')));
    expect(again.fixed.map((r) => r.estimate)).toEqual(fit.fixed.map((r) => r.estimate));
  });

  it("fixed effects and group SDs carry the fit's numbers; shares of the variance sum to 1", () => {
    const fe = fixedEffectsTable(fit);
    expect(fe.array('effect')).toEqual(fit.fixed.map((r) => r.term));
    expect(fe.array('estimate')).toEqual(fit.fixed.map((r) => r.estimate));
    const sd = groupSdTable(fit);
    // random intercepts only: shares of the variance sum to 1 (definition, common practice, no source)
    const shares = sd.array('share') as number[];
    expect(shares.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
    expect(sd.array('sd')).toEqual(fit.random.map((r) => r.sd));
  });

  it('predicted group effects have intervals of ±z·sd with z = 1.959963984540054 for 95% (scipy.stats.norm.ppf(0.975))', () => {
    const ge = groupEffectsTable(fit).objects() as { effect: number; sd: number; lower: number; upper: number }[];
    expect(ge.length).toBe(fit.modes.length);
    for (const r of ge) {
      expect(r.upper - r.effect).toBeCloseTo(1.959963984540054 * r.sd, 9);
      expect(r.effect - r.lower).toBeCloseTo(1.959963984540054 * r.sd, 9);
    }
  });

  it('metrics rows become a table with groupby/rollup', () => {
    const rows: MetricRow[] = [
      { scenario: 'a', variant: 'v', parameter: 'x', kind: 'fixed', metric: 'coverage', value: 0.9, mcse: 0.01, n: 100 },
      { scenario: 'b', variant: 'v', parameter: 'x', kind: 'fixed', metric: 'coverage', value: 0.95, mcse: 0.01, n: 100 },
    ];
    const mean = metricsTable(rows).groupby('variant').rollup({ m: aq.op.mean('value') }).get('m', 0);
    expect(mean).toBeCloseTo(0.925, 12); // (0.9 + 0.95) / 2
  });
});
