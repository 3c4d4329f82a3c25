/**
 * The bundled demo survey (invented data, data/README.md): the committed CSV is exactly what
 * the generator makes, and the demo model fitted to it lands near the invented truth.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'fs';
import { join } from 'path';
import { readCsvFile } from '../../kernel-lib/data/csv';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import type { FitResult } from '../../kernel-lib/fit/result';
import { parseModel } from '../../kernel-lib/model/parse';
import { DEMO_COLUMNS, DEMO_TRUTH, demoRowsToCsv, makeDemoRows } from '../../data/make-demo';

const DATA_DIR = join(__dirname, '..', '..', 'data');
const CSV_PATH = join(DATA_DIR, 'demo-survey.csv');
const MODEL_PATH = join(DATA_DIR, 'demo-model.json');
const MODEL_YEAR_FIXED_PATH = join(DATA_DIR, 'demo-model-year-fixed.json');

function fixedRow(fit: FitResult, term: string) {
  const row = fit.fixed.find((f) => f.term === term);
  if (row === undefined) throw new Error(`no fixed-effect row "${term}" in ${fit.fixed.map((f) => f.term).join(', ')}`);
  return row;
}

function randomSd(fit: FitResult, factor: string): number {
  const row = fit.random.find((r) => r.factor === factor && r.term === 'intercept');
  if (row === undefined) throw new Error(`no variance component for "${factor}"`);
  return row.sd;
}

describe('demo survey file', () => {
  it('equals the generator output byte for byte', () => {
    const committed = readFileSync(CSV_PATH, 'utf8');
    expect(demoRowsToCsv(makeDemoRows())).toBe(committed);
  });

  it('is deterministic: two runs give the same rows', () => {
    expect(makeDemoRows()).toEqual(makeDemoRows());
  });

  it('has the stated layout: 6 sites x 4 years x 3 plots x 2 visits, 2-4% missing responses', () => {
    const text = readFileSync(CSV_PATH, 'utf8');
    const lines = text.trimEnd().split('\n');
    expect(lines[0]).toBe(DEMO_COLUMNS.join(','));
    expect(lines.length - 1).toBe(144);
    // Plain numbers with at most 3 decimals, no exponent.
    for (const line of lines.slice(1)) {
      for (const cell of line.split(',').slice(2)) {
        if (cell !== '') expect(cell).toMatch(/^-?\d+(\.\d{1,3})?$/);
      }
    }
    const cols = readCsvFile(CSV_PATH);
    const site = Array.from(cols.site as ArrayLike<unknown>);
    const plot = Array.from(cols.plot as ArrayLike<unknown>);
    const year = Array.from(cols.year as ArrayLike<unknown>);
    const visit = Array.from(cols.visit as ArrayLike<unknown>);
    expect(new Set(site).size).toBe(6);
    expect(new Set(year).size).toBe(4);
    expect([...new Set(plot)].sort()).toEqual([1, 2, 3]);
    expect([...new Set(visit)].sort()).toEqual([1, 2]);
    // Each site, year, plot and visit appears once.
    const cells = new Set(site.map((s, i) => `${s}/${year[i]}/${plot[i]}/${visit[i]}`));
    expect(cells.size).toBe(144);
    // Grazing is a site-level covariate: one value per site.
    const grazing = Array.from(cols.grazing as ArrayLike<unknown>);
    const bySite = new Map<unknown, Set<unknown>>();
    site.forEach((s, i) => bySite.set(s, (bySite.get(s) ?? new Set()).add(grazing[i])));
    for (const levels of bySite.values()) expect(levels.size).toBe(1);
    const missing = Array.from(cols.sedge_height as ArrayLike<unknown>).filter((v) => v === null).length;
    expect(missing / 144).toBeGreaterThanOrEqual(0.02);
    expect(missing / 144).toBeLessThanOrEqual(0.04);
  });
});

describe('demo model files', () => {
  it('parse, and the year-fixed variant differs from the demo model only in year.as', () => {
    const random = JSON.parse(readFileSync(MODEL_PATH, 'utf8'));
    const fixed = JSON.parse(readFileSync(MODEL_YEAR_FIXED_PATH, 'utf8'));
    parseModel(random);
    parseModel(fixed);
    const yearIndex = random.groups.findIndex((g: { factor: string }) => g.factor === 'year');
    expect(random.groups[yearIndex].as).toBe('random');
    expect(fixed.groups[yearIndex].as).toBe('fixed');
    fixed.groups[yearIndex].as = 'random';
    expect(fixed).toEqual(random);
  });
});

describe('demo model fitted to the demo survey', () => {
  const fit = fitModel(readCsvFile(CSV_PATH), readFileSync(MODEL_PATH, 'utf8'));

  it('converges on 140 complete rows with the expected grouping levels', () => {
    expect(fit.failure).toBe('');
    expect(fit.converged).toBe(true);
    expect(fit.observations).toBe(140);
    expect(fit.droppedRows).toBe(4);
    expect(fit.levels).toEqual({ site: 6, plot: 18, year: 4 });
  });

  it('fixed effects lie within 3 SE of the invented truth', () => {
    // Consistency check, 3 SE: common practice, no source.
    const truth: Record<string, number> = {
      intercept: DEMO_TRUTH.intercept,
      soil_moisture: DEMO_TRUTH.soilMoisture,
      'grazing=ungrazed': DEMO_TRUTH.ungrazed,
    };
    for (const [term, value] of Object.entries(truth)) {
      const row = fixedRow(fit, term);
      expect(Number.isFinite(row.se) && row.se > 0).toBe(true);
      expect(Math.abs(row.estimate - value)).toBeLessThan(3 * row.se);
    }
  });

  it('variance components are near the invented truth, within tolerances set by their degrees of freedom', () => {
    // Relative SE of an SD estimate on d degrees of freedom is about 1/sqrt(2d)
    // (Var(s^2) = 2 sigma^4 / d for a chi-square on d df, delta method); bounds of roughly
    // 3 such SEs: common practice, no source.
    // Residual: about 100 df -> relative SE 0.07; allow 25%.
    expect(fit.residualSd).toBeGreaterThan(0.75 * DEMO_TRUTH.sdResidual);
    expect(fit.residualSd).toBeLessThan(1.25 * DEMO_TRUTH.sdResidual);
    // Plot within site: 18 plots in 6 sites, 12 df -> relative SE about 0.2 (more with the
    // residual noise); allow a factor of 2 either way.
    expect(randomSd(fit, 'plot')).toBeGreaterThan(0.5 * DEMO_TRUTH.sdPlot);
    expect(randomSd(fit, 'plot')).toBeLessThan(2 * DEMO_TRUTH.sdPlot);
    // Site (6 sites less grazing: 4 df) and year (3 df): relative SE 0.35-0.4, so a zero
    // estimate is plausible and only an upper bound of 2.5x is checked.
    expect(randomSd(fit, 'site')).toBeGreaterThanOrEqual(0);
    expect(randomSd(fit, 'site')).toBeLessThan(2.5 * DEMO_TRUTH.sdSite);
    expect(randomSd(fit, 'year')).toBeGreaterThanOrEqual(0);
    expect(randomSd(fit, 'year')).toBeLessThan(2.5 * DEMO_TRUTH.sdYear);
  });

  it('agrees with statsmodels on the same file', () => {
    // statsmodels 0.13.5 MixedLM on data/demo-survey.csv (missing rows dropped), one-off run:
    //   smf.mixedlm('sedge_height ~ soil_moisture + C(grazing)', df, groups=np.ones(n),
    //     re_formula='0', vc_formula={'site': '0+C(site)', 'plotid': '0+C(plotid)',
    //     'year': '0+C(year)'}).fit(reml=True, method=['lbfgs'])   with plotid = site/plot.
    // Values printed to 6-7 significant digits; statsmodels' default optimiser tolerance
    // limits agreement to about 1e-4 relative.
    const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
    expect(rel(fixedRow(fit, 'intercept').estimate, 46.870772)).toBeLessThan(1e-4);
    expect(rel(fixedRow(fit, 'soil_moisture').estimate, 3.876651)).toBeLessThan(1e-4);
    expect(rel(fixedRow(fit, 'grazing=ungrazed').estimate, 14.488816)).toBeLessThan(1e-4);
    expect(rel(fixedRow(fit, 'grazing=ungrazed').se, 2.352704)).toBeLessThan(1e-3);
    expect(rel(fit.residualSd, 2.7661182)).toBeLessThan(1e-3);
    expect(rel(randomSd(fit, 'plot'), 2.1354515)).toBeLessThan(1e-3);
    expect(rel(randomSd(fit, 'site'), 2.5388400)).toBeLessThan(1e-3);
    expect(rel(randomSd(fit, 'year'), 4.1012591)).toBeLessThan(1e-3);
  });

  it('the year-fixed variant also converges, with three year contrasts and no year variance', () => {
    const fitYearFixed = fitModel(readCsvFile(CSV_PATH), readFileSync(MODEL_YEAR_FIXED_PATH, 'utf8'));
    expect(fitYearFixed.converged).toBe(true);
    expect(fitYearFixed.fixed.filter((f) => f.term.startsWith('year=')).length).toBe(3);
    expect(fitYearFixed.random.some((r) => r.factor === 'year')).toBe(false);
    // Grazing is a between-site contrast: treating year as fixed barely changes it in a
    // balanced layout (common practice, no source).
    expect(Math.abs(fixedRow(fitYearFixed, 'grazing=ungrazed').estimate - fixedRow(fit, 'grazing=ungrazed').estimate)).toBeLessThan(
      0.1 * fixedRow(fit, 'grazing=ungrazed').se,
    );
  });
});
