import { describe, expect, it } from 'vitest';
import { readFileSync } from 'fs';
import { join } from 'path';
import { readCsvFile } from '../../kernel-lib/data/csv';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { predictedGroupEffects, fixedEffectsCompare, groupData, normalQuantilePlot, residualsVsFitted } from '../../kernel-lib/plots';
import { expectValidAndRendered, markItems } from '../helpers/vega-lite-checks';
import { groupEffectRows } from '../../kernel-lib/notebook/tables';

// The single-fit builders on real fit results: the invented Larkspur Fen survey (data/README.md)
// fitted with year as a random and as a fixed grouping factor. No snapshots here (the numbers
// belong to the engine's tests); the checks are that real results render and that counts agree.
const DATA = join(__dirname, '..', '..', 'data');
const columns = readCsvFile(join(DATA, 'demo-survey.csv'));
const yearRandom = fitModel(columns, readFileSync(join(DATA, 'demo-model.json'), 'utf8'));
const yearFixed = fitModel(columns, readFileSync(join(DATA, 'demo-model-year-fixed.json'), 'utf8'));

describe('single-fit plots of the demo survey fits', () => {
  it('groupData renders every recorded height', async () => {
    const names = Object.keys(columns);
    const rows = Array.from({ length: columns.site.length }, (_, i) =>
      Object.fromEntries(names.map((n) => [n, columns[n][i] as unknown])),
    );
    const spec = groupData(rows, { response: 'sedge_height', group: 'site' });
    const { view } = await expectValidAndRendered(spec, ['<path']);
    expect(markItems(view, 'observations')).toHaveLength(yearRandom.observations);
    expect(markItems(view, 'group_means')).toHaveLength(yearRandom.levels.site);
  });

  it('predictedGroupEffects draws a raw deviation, a predicted effect and an interval per site', async () => {
    const model = JSON.parse(readFileSync(join(DATA, 'demo-model.json'), 'utf8'));
    const spec = predictedGroupEffects(groupEffectRows(yearRandom, columns, model), { factor: 'site' });
    const { view } = await expectValidAndRendered(spec, ['<line', '<path']);
    expect(markItems(view, 'predicted')).toHaveLength(yearRandom.levels.site);
    expect(markItems(view, 'raw')).toHaveLength(yearRandom.levels.site);
    expect(markItems(view, 'intervals')).toHaveLength(yearRandom.levels.site);
    // nested plots are labelled site/plot and found in the data
    const plots = groupEffectRows(yearRandom, columns, model).filter((r) => r.factor === 'plot');
    expect(plots).toHaveLength(yearRandom.levels.plot);
    expect(plots.every((r) => r.n > 0 && Number.isFinite(r.raw))).toBe(true);
  });

  it('residual plots draw one point per observation', async () => {
    const a = await expectValidAndRendered(residualsVsFitted(yearRandom), ['<path']);
    expect(markItems(a.view, 'residual_points')).toHaveLength(yearRandom.observations);
    const b = await expectValidAndRendered(normalQuantilePlot(yearRandom), ['<path']);
    expect(markItems(b.view, 'quantile_points')).toHaveLength(yearRandom.observations);
  });

  it('fixedEffectsCompare shows the year terms only the year-fixed fit has', async () => {
    const spec = fixedEffectsCompare([
      { name: 'year random', fit: yearRandom },
      { name: 'year fixed', fit: yearFixed },
    ]);
    const { view, svg } = await expectValidAndRendered(spec, ['<line']);
    const extra = yearFixed.fixed.filter((r) => !yearRandom.fixed.some((s) => s.term === r.term)).length;
    expect(extra).toBeGreaterThan(0);
    expect(markItems(view, 'missing_estimates')).toHaveLength(extra);
    expect(svg).toContain('not in this model</text>');
  });
});
