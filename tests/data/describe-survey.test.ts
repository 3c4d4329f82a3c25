import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { readFileSync } from 'node:fs';
import { describeSurvey } from '../../kernel-lib/data/describe-survey';
import { readCsvFile } from '../../kernel-lib/data/csv';
import { designFromSurvey } from '../../kernel-lib/design/from-survey';
import { parseDesign } from '../../kernel-lib/design/parse';

const demo = readCsvFile(join(__dirname, '..', '..', 'data', 'demo-survey.csv'));
const model = JSON.parse(readFileSync(join(__dirname, '..', '..', 'data', 'demo-model.json'), 'utf8'));

describe('describeSurvey', () => {
  // The demo layout documented in data/README.md: 6 sites × 4 years × 3 plots per site × 2 visits,
  // 4 heights missing (counted by hand from the layout, common practice, no source).
  it('counts levels, nesting and crossing of the demo survey', () => {
    const s = describeSurvey(demo, ['site', 'plot', 'year'], 'sedge_height', { plot: 'site' });
    expect(s.rows).toBe(144);
    expect(s.factors.map((f) => [f.factor, f.levels, f.perLevelMin])).toEqual([['site', 6, 24], ['plot', 18, 8], ['year', 4, 36]]);
    expect(s.pairs.find((p) => p.a === 'site' && p.b === 'plot')!.relation).toBe('contains');
    expect(s.pairs.find((p) => p.a === 'site' && p.b === 'year')!.relation).toBe('crossed');
    expect(s.perCellMin).toBe(2);
    expect(s.responseMissing).toBe(4);
    expect(s.balanced).toBe(true);
  });

  it('without the nesting declared, plot labels 1-3 look crossed with site', () => {
    const s = describeSurvey(demo, ['site', 'plot'], undefined);
    expect(s.factors[1].levels).toBe(3);
    expect(s.pairs[0].relation).toBe('crossed');
  });

  it('an empty cell makes a pair partly crossed and the survey unbalanced', () => {
    const data = { site: ['a', 'a', 'b'], year: ['1', '2', '1'] };
    const s = describeSurvey(data, ['site', 'year']);
    expect(s.pairs[0]).toMatchObject({ relation: 'partly crossed', cellsPresent: 3, cellsPossible: 4 });
    expect(s.balanced).toBe(false);
  });

  it('names a missing column', () => {
    expect(() => describeSurvey(demo, ['sites'])).toThrow(/column "sites" not found/);
  });
});

describe('designFromSurvey', () => {
  it('derives a design that looks like the pilot and parses', () => {
    const { design, fit, notes } = designFromSurvey(demo, model, { seed: 5, replicates: 200 });
    expect(design.factors).toEqual([
      { name: 'site', levels: 6, labels: ['ashpool', 'brackenway', 'curlewflat', 'dunlinbank', 'eelmere', 'fernholt'] },
      { name: 'plot', levels: 3, within: 'site' },
      { name: 'year', levels: 4, labels: ['2021', '2022', '2023', '2024'] },
    ]);
    expect(design.perCell).toBe(2);
    // 140 of 6 × 3 × 4 × 2 = 144 rows used
    expect(design.missing).toBeCloseTo(4 / 144, 3);
    const grazing = design.covariates!.find((c) => c.name === 'grazing')!;
    expect(grazing.varies).toBe('site');
    expect(grazing.allocation).toBe('balanced');
    expect(design.covariates!.find((c) => c.name === 'soil_moisture')!.varies).toBe('observation');
    // truth = the pilot estimates (4 significant digits)
    const slope = fit.fixed.find((r) => r.term === 'soil_moisture')!.estimate;
    expect(design.truth.fixed!.soil_moisture).toBeCloseTo(slope, 2);
    expect(design.truth.sd.residual).toBeCloseTo(fit.residualSd, 3);
    expect(design.variants.map((v) => v.name)).toEqual(['as in the pilot model', 'site fixed', 'plot fixed', 'year fixed']);
    expect(notes.join(' ')).toContain('plausible');
    expect(() => parseDesign(design)).not.toThrow();
  });
});
