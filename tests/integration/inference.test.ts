import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { Matrix, inverse } from 'ml-matrix';
import { readCsvFile } from '../../kernel-lib/data/csv';
import { buildDesign } from '../../kernel-lib/data/build-design';
import { parseModel } from '../../kernel-lib/model/parse';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { checkInterval } from '../../kernel-lib/model/interval-rule';
import { fitDesign, INTERVAL_METHODS } from '../../kernel-lib/fit/fit-design';
import { termTest, termCoefficients } from '../../kernel-lib/fit/inference/contrast-test';
import { KR_MAX_DIMENSION } from '../../kernel-lib/fit/inference/kenward-roger';
import { QuadratInputError } from '../../kernel-lib/model/errors';
import { fitToJson, formatFit } from '../../kernel-lib/cli/format-fit';
import { handDesign } from '../helpers/simple-design';

const ROOT = join(__dirname, '..', '..');
const CSV = join(ROOT, 'data', 'demo-survey.csv');
const MODEL_YEAR_FIXED = join(ROOT, 'data', 'demo-model-year-fixed.json');

describe('interval methods through the model description', () => {
  it('a model without interval gets Satterthwaite intervals; the engine default stays Wald', () => {
    const data = readCsvFile(CSV);
    const model = JSON.parse(readFileSync(MODEL_YEAR_FIXED, 'utf8'));
    const fit = fitModel(data, model);
    expect(fit.fixed.every((r) => r.method === 'satterthwaite')).toBe(true);
    // grazing varies between sites only: 6 sites, intercept and grazing → about 6 − 2 df, far below n − p
    // (common practice, no source: the between-site stratum has sites − 2 df in a balanced layout)
    const grazing = fit.fixed.find((r) => r.term === 'grazing=ungrazed')!;
    expect(grazing.df).toBeGreaterThan(3);
    expect(grazing.df).toBeLessThan(5);
    const design = buildDesign(data, parseModel(model));
    expect(fitDesign(design).fixed[0].method).toBe('wald');
  });

  it('names every method when one is unknown, and refuses Kenward-Roger with ML naming the field', () => {
    expect(INTERVAL_METHODS).toEqual(['wald', 'residual-t', 'satterthwaite', 'kenward-roger', 'profile', 'bootstrap']);
    expect(() => checkInterval('bogus', { family: 'gaussian', estimation: 'REML', random: true })).toThrow(/model\.interval: interval method "bogus" is not available; expected one of: wald, residual-t, satterthwaite, kenward-roger, profile, bootstrap/);
    const data = readCsvFile(CSV);
    const model = { ...JSON.parse(readFileSync(MODEL_YEAR_FIXED, 'utf8')), estimation: 'ML', interval: 'kenward-roger' };
    let error: unknown;
    try { fitModel(data, model); } catch (e) { error = e; }
    expect(error).toBeInstanceOf(QuadratInputError);
    expect((error as QuadratInputError).message).toMatch(/model\.interval: "kenward-roger" is defined for REML fits only, but model\.estimation is "ML"/);
    // the same refusal from the engine entry point
    const design = buildDesign(data, parseModel({ ...model, interval: 'satterthwaite' }));
    expect(() => fitDesign(design, { estimation: 'ML', interval: 'kenward-roger' })).toThrow(/REML fits only/);
  });

  it('refuses Kenward-Roger beyond the dense size limit with a message naming the field and the limit', () => {
    const groups = KR_MAX_DIMENSION;
    const g = Array.from({ length: 2 * groups }, (_, i) => i % groups);
    const y = g.map((l, i) => Math.sin(l) + Math.cos(3 * i));
    const d = handDesign(y.map(() => [1]), ['intercept'], y, [{ factor: 'plot', index: g }]);
    expect(() => fitDesign(d, { interval: 'kenward-roger' })).toThrow(/model\.interval: "kenward-roger" uses dense matrices of size q \+ p = 2001.*limit is 2000/);
  });

  it('OLS keeps exact t intervals whatever method is asked for', () => {
    const d = handDesign([[1, 0], [1, 1], [1, 2], [1, 3], [1, 5]], ['intercept', 'x'], [1, 2.2, 2.9, 4.1, 6.2]);
    for (const interval of ['satterthwaite', 'kenward-roger', 'profile'] as const) {
      const fit = fitDesign(d, { interval });
      expect(fit.fixed.every((r) => r.method === 'residual-t' && r.df === 3)).toBe(true);
    }
  });
});

describe('F test of a categorical term on the demo survey (year entered as fixed)', () => {
  const data = readCsvFile(CSV);
  const model = parseModel(JSON.parse(readFileSync(MODEL_YEAR_FIXED, 'utf8')));
  const design = buildDesign(data, model);
  const fit = fitDesign(design);

  it('selects every year[level] coefficient', () => {
    expect(termCoefficients(design.fixedNames, 'year')).toEqual(['year=2022', 'year=2023', 'year=2024']);
    expect(() => termCoefficients(design.fixedNames, 'rainfall')).toThrow(/term "rainfall": no coefficient of that name/);
  });

  it('the Satterthwaite F is the Wald F (computed with ml-matrix) on Fai-Cornelius df; KR is close in a near-balanced layout', () => {
    const s = termTest(design, fit, 'year', 'satterthwaite');
    const idx = s.coefficients.map((c) => design.fixedNames.indexOf(c));
    const p = design.p;
    const V = new Matrix(idx.map((a) => idx.map((b) => fit.fixedCov[a * p + b])));
    const b = Matrix.columnVector(idx.map((a) => fit.fixed[a].estimate));
    // Wald F = β̂ᵀ(LΦLᵀ)⁻¹β̂/ℓ (any linear-models text)
    const wald = b.transpose().mmul(inverse(V)).mmul(b).get(0, 0) / 3;
    expect(s.statistic).toBeCloseTo(wald, 8);
    expect(s.numDf).toBe(3);
    // year is crossed with everything and observed within plots: its error stratum is the residual (~120 df)
    expect(s.denDf).toBeGreaterThan(100);
    expect(s.denDf).toBeLessThan(140);
    const kr = termTest(design, fit, 'year', 'kenward-roger');
    expect(Math.abs(kr.statistic / s.statistic - 1)).toBeLessThan(0.02);
    expect(Math.abs(kr.denDf / s.denDf - 1)).toBeLessThan(0.05);
    expect(kr.pValue).toBeGreaterThan(0);
    expect(kr.pValue).toBeLessThan(1e-10); // the invented survey has strong year effects
  });
});

describe('printing', () => {
  it('shows df for t-based methods and SD intervals for profile fits, in text and JSON', () => {
    const data = readCsvFile(CSV);
    const model = JSON.parse(readFileSync(MODEL_YEAR_FIXED, 'utf8'));
    const satt = formatFit(fitModel(data, model), 0.95);
    expect(satt).toMatch(/Effects with 95% intervals \(Satterthwaite df\)/);
    expect(satt).toMatch(/\bdf\b/);
    const prof = fitModel(data, { ...model, interval: 'profile', level: 0.9 });
    const text = formatFit(prof, 0.9);
    expect(text).toMatch(/90% interval of SD/);
    expect(text).toMatch(/Effects with 90% intervals \(profile likelihood\)/);
    const json = fitToJson(prof, 0.9);
    expect(json.random.every((r) => 'lower' in r && typeof r.lower === 'number')).toBe(true);
    expect(typeof json.residualSdLower).toBe('number');
  });

  it('the command line passes --ci and --level through', () => {
    const bin = join(ROOT, 'bin', 'quadrat.js');
    const out = spawnSync(process.execPath, [bin, 'fit', '--data', CSV, '--model', MODEL_YEAR_FIXED, '--ci', 'kenward-roger', '--level', '0.9'], { encoding: 'utf8' });
    expect(out.status).toBe(0);
    expect(out.stdout).toMatch(/Effects with 90% intervals \(Kenward-Roger df and covariance\)/);
  });
});
