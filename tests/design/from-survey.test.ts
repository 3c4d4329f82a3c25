import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { readFileSync } from 'node:fs';
import { readCsvFile } from '../../kernel-lib/data/csv';
import { designFromSurvey } from '../../kernel-lib/design/from-survey';
import { parseDesign } from '../../kernel-lib/design/parse';
import { expandGrid } from '../../kernel-lib/design/grid';
import { simulateColumns } from '../../kernel-lib/design/simulate';
import { createStream } from '../../kernel-lib/random/stream';
import { fitModel } from '../../kernel-lib/analyse/fit-model';

// The invented Larkspur Fen pilot (data/README.md): years 2021-2024, six named sites, plots 1-3 per site.
const demo = readCsvFile(join(__dirname, '..', '..', 'data', 'demo-survey.csv'));
const model = JSON.parse(readFileSync(join(__dirname, '..', '..', 'data', 'demo-model.json'), 'utf8'));

describe('designFromSurvey keeps the pilot level names', () => {
  const { design } = designFromSurvey(demo, model, { seed: 3, replicates: 10 });

  it('writes the crossed factors\' pilot labels in natural order into the design; nested plots stay numbered', () => {
    const byName = new Map(design.factors.map((f) => [f.name, f]));
    expect(byName.get('year')!.labels).toEqual(['2021', '2022', '2023', '2024']);
    expect(byName.get('site')!.labels).toEqual(['ashpool', 'brackenway', 'curlewflat', 'dunlinbank', 'eelmere', 'fernholt']);
    expect(byName.get('plot')!.labels).toBeUndefined();
  });

  it('simulates with those names, so a year-fixed fit names its coefficients year=2022, …', () => {
    const scenario = expandGrid(parseDesign(design))[0];
    const sim = simulateColumns(scenario.design, createStream(3, 'labels'));
    expect([...new Set(sim.columns.year as string[])].sort()).toEqual(['2021', '2022', '2023', '2024']);
    const fixed = design.variants.find((v) => v.name === 'year fixed')!.model;
    const fit = fitModel(sim.columns, fixed);
    expect(fit.fixed.map((r) => r.term).filter((t) => t.startsWith('year'))).toEqual(['year=2022', 'year=2023', 'year=2024']);
  });

  it('continues the years when a grid asks for more of them', () => {
    const scenarios = expandGrid(parseDesign({ ...design, grid: { 'factors.year.levels': [2, 6] } }));
    expect(scenarios.map((s) => s.design.factors.find((f) => f.name === 'year')!.labels)).toEqual([
      ['2021', '2022'],
      ['2021', '2022', '2023', '2024', '2025', '2026'],
    ]);
  });
});
