import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { formatFit } from '../../kernel-lib/cli/format-fit';
import { readCsvFile } from '../../kernel-lib/data/csv';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { parseModel } from '../../kernel-lib/model/parse';

const ROOT = join(__dirname, '..', '..');
const data = readCsvFile(join(ROOT, 'data', 'demo-survey.csv'));
const model = parseModel(JSON.parse(readFileSync(join(ROOT, 'data', 'demo-model.json'), 'utf8')));
const fit = fitModel(data, model);
const text = formatFit(fit, 0.95, 'demo', model);
const lines = text.split('\n');

describe('formatFit: the printed fit', () => {
  it('leads with where the variation lies, then effects, then diagnostics', () => {
    const at = (heading: RegExp) => lines.findIndex((l) => heading.test(l));
    expect(at(/^Where the variation lies/)).toBeGreaterThan(0);
    expect(at(/^Effects with 95% intervals/)).toBeGreaterThan(at(/^Where the variation lies/));
    expect(at(/^Fit diagnostics/)).toBeGreaterThan(at(/^Effects with/));
  });

  it('gives each grouping factor its levels, SD and share of the variance, the residual last as within-level variation', () => {
    const random = fit.random.filter((r) => r.factor !== 'residual');
    const total = fit.random.reduce((a, r) => a + r.variance, 0);
    for (const r of random) {
      const source = r.factor === 'plot' ? 'between levels of plot, within site' : `between levels of ${r.factor}`;
      const line = lines.find((l) => l.trim().startsWith(source))!;
      expect(line, source).toBeDefined();
      // share = variance of the source / total variance (definition of a variance share, common practice, no source)
      expect(line).toContain(`${Math.round((100 * r.variance) / total)}%`);
      expect(line).toMatch(new RegExp(`\\s${fit.levels[r.factor]}\\s`));
    }
    const residual = fit.random.find((r) => r.factor === 'residual')!;
    const withinLine = lines.find((l) => l.trim().startsWith('within levels (residual)'))!;
    expect(withinLine).toContain(`${Math.round((100 * residual.variance) / total)}%`);
    const table = lines.slice(lines.findIndex((l) => l.startsWith('Where')), lines.findIndex((l) => l.startsWith('Effects'))).join('\n');
    const shares = [...table.matchAll(/\s(\d+)%\s/g)].map((m) => Number(m[1]));
    expect(Math.abs(shares.reduce((a, b) => a + b, 0) - 100)).toBeLessThanOrEqual(2); // rounding of 4 shares
  });

  it('writes every effect with its interval as "lower to upper", named column=level', () => {
    for (const r of fit.fixed) {
      const line = lines.find((l) => l.trim().startsWith(`${r.term} `))!;
      expect(line, r.term).toBeDefined();
      expect(line).toMatch(/\d to -?\d/);
    }
    expect(text).toContain('grazing=ungrazed');
    expect(text).not.toMatch(/Variance components|\[ungrazed\]/);
  });

  it('a fixed grouping factor is listed among the sources and its levels among the effects', () => {
    const fixedYear = parseModel({ ...model, groups: model.groups.map((g) => (g.factor === 'year' ? { ...g, as: 'fixed' as const } : g)) });
    const t = formatFit(fitModel(data, fixedYear), 0.95, 'year fixed', fixedYear);
    expect(t).toMatch(/levels of year: fixed effects\s+4/);
    expect(t).toContain('year=2022');
    expect(t).not.toMatch(/between levels of year/);
  });
});
