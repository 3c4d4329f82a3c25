import { describe, expect, it } from 'vitest';
import * as aq from 'arquero';
import { fitModel, fitResolvedModel } from '../../kernel-lib/analyse/fit-model';
import { parseModel } from '../../kernel-lib/model/parse';
import { inputError } from '../helpers/input-error';
import { oneWayMeanSquares } from '../helpers/one-way-anova';

// Invented balanced survey: 5 sites × 4 quadrats, cover (%) of one species.
const cover = [
  [31.2, 28.4, 35.1, 30.0],
  [22.5, 25.9, 20.7, 24.4],
  [40.3, 37.8, 43.6, 39.1],
  [27.7, 30.2, 26.1, 29.5],
  [33.0, 35.6, 31.4, 36.8],
];
const records = cover.flatMap((g, s) => g.map((v, q) => ({ site: `site${s + 1}`, quadrat: q + 1, cover: v })));
const model = { response: 'cover', groups: [{ factor: 'site', as: 'random' as const }] };


describe('fitModel: balanced one-way random intercept against the ANOVA estimators', () => {
  // REML equals the ANOVA estimators when MSB > MSW: σ̂² = MSW, σ̂²_site = (MSB − MSW)/m, and the
  // intercept is the grand mean with variance MSB/(a m) (Searle, Casella and McCulloch 1992, ch. 3 and 6).
  it('estimates, SDs and the SE of the intercept', () => {
    const { a, m, grand, msb, msw } = oneWayMeanSquares(cover);
    const fit = fitModel(records, model);
    const intercept = fit.fixed.find((r) => r.term === 'intercept')!;
    expect(intercept.estimate).toBeCloseTo(grand, 8);
    expect(intercept.se).toBeCloseTo(Math.sqrt(msb / (a * m)), 5);
    expect(fit.residualSd).toBeCloseTo(Math.sqrt(msw), 5);
    expect(fit.random.find((r) => r.factor === 'site')!.sd).toBeCloseTo(Math.sqrt((msb - msw) / m), 5);
  });

  it('gives the same fit from records, columns, an arquero table, a JSON string and a parsed model', () => {
    const fromRecords = fitModel(records, model);
    const columns = { site: records.map((r) => r.site), quadrat: records.map((r) => r.quadrat), cover: records.map((r) => r.cover) };
    const same = (f: ReturnType<typeof fitModel>) => {
      expect(f.fixed[0].estimate).toBe(fromRecords.fixed[0].estimate);
      expect(f.residualSd).toBe(fromRecords.residualSd);
    };
    same(fitModel(columns, model));
    same(fitModel(aq.from(records), model));
    same(fitModel(records, JSON.stringify(model)));
    same(fitResolvedModel(records, parseModel(model)));
  });

  it('options override the model: ML gives the smaller variance estimates (divisor n instead of n − p)', () => {
    const reml = fitModel(records, model);
    const ml = fitModel(records, model, { estimation: 'ML' });
    expect(ml.random[0].sd).toBeLessThan(reml.random[0].sd);
    expect(fitModel(records, { ...model, estimation: 'ML' }).random[0].sd).toBeCloseTo(ml.random[0].sd, 12);
  });

  it('refuses Kenward-Roger with ML and bad options, naming the field', () => {
    const e = inputError(() => fitModel(records, { ...model, interval: 'kenward-roger' }, { estimation: 'ML' }));
    expect(e.field).toBe('model.interval');
    expect(inputError(() => fitModel(records, model, { interval: 'magic' as never })).field).toBe('options.interval');
    expect(inputError(() => fitModel(records, model, { level: 2 })).field).toBe('options.level');
  });
});
