import { describe, expect, it } from 'vitest';
import { levelLabels } from '../../kernel-lib/design/factors';
import { parseDesign } from '../../kernel-lib/design/parse';
import { semidefiniteCholesky } from '../../kernel-lib/design/truth';
import { inputError } from '../helpers/input-error';

/** The example survey of the design contract (invented: six sites, three years, four plots per site). */
function example(): any {
  return {
    seed: 42,
    replicates: 1000,
    factors: [
      { name: 'site', levels: 6 },
      { name: 'year', levels: 3 },
      { name: 'plot', levels: 4, within: 'site' },
    ],
    perCell: 2,
    missing: 0.1,
    covariates: [
      { name: 'rain', varies: 'observation', normal: { mean: 0, sd: 1 } },
      { name: 'habitat', varies: 'site', categories: { dry: 0.5, wet: 0.5 } },
    ],
    truth: { fixed: { intercept: 10, rain: 0.5, 'habitat=wet': 1 }, sd: { site: 1, year: 0.5, residual: 2 } },
    variants: [
      {
        name: 'year random',
        model: { response: 'y', fixed: ['rain', 'habitat'], groups: [{ factor: 'site', as: 'random' }, { factor: 'year', as: 'random' }] },
      },
      {
        name: 'year fixed',
        model: { response: 'y', fixed: ['rain', 'habitat'], groups: [{ factor: 'site', as: 'random' }, { factor: 'year', as: 'fixed' }] },
      },
    ],
    grid: { 'factors.year.levels': [3, 4, 5, 8], 'truth.sd.site': [0.5, 1] },
  };
}


describe('parseDesign: the contract example', () => {
  const d = parseDesign(example());

  it('fills defaults and resolves factors with nested totals', () => {
    expect(d.response).toBe('y');
    expect(d.family).toBe('gaussian');
    expect(d.factors.map((f) => [f.name, f.totalLevels])).toEqual([['site', 6], ['year', 3], ['plot', 24]]);
    expect(d.factors[0].labels).toEqual(['site1', 'site2', 'site3', 'site4', 'site5', 'site6']);
    expect(d.factors[2].labels[0]).toBe('plot01');
    // Plot g lies in site floor(g / 4): plots 01-04 in site1, 05-08 in site2 (nesting by definition).
    expect(Array.from(d.factors[2].outerLevel!.subarray(0, 9))).toEqual([0, 0, 0, 0, 1, 1, 1, 1, 2]);
    expect(d.warnings).toEqual([]);
  });

  it('names each variant\'s coefficients and attaches their truth', () => {
    expect(d.variants[0].coefficients).toEqual(['intercept', 'rain', 'habitat=wet']);
    expect(d.variants[0].truth).toEqual({ intercept: 10, rain: 0.5, 'habitat=wet': 1 });
    expect(d.variants[0].realised).toEqual([]);
    expect(d.variants[1].coefficients).toEqual(['intercept', 'rain', 'habitat=wet', 'year=year2', 'year=year3']);
    // year has random truth, so as a fixed factor its contrasts and the intercept estimate realised effects.
    expect(d.variants[1].realised).toEqual(['intercept', 'year=year2', 'year=year3']);
  });

  it('accepts JSON text', () => {
    expect(parseDesign(JSON.stringify(example())).variants.length).toBe(2);
  });

  it('keeps a copy of the input, not the input itself', () => {
    const input = example();
    const design = parseDesign(input);
    input.perCell = 99;
    expect(design.source.perCell).toBe(2);
  });
});

describe('levelLabels', () => {
  it('zero-pads so that sorted text order equals level order', () => {
    // Plain string comparison (common practice, no source): "site10" < "site2" without padding.
    const labels = levelLabels('site', 12);
    expect(labels[0]).toBe('site01');
    expect([...labels].sort()).toEqual(labels);
    expect(levelLabels('plot', 100)[9]).toBe('plot010');
  });
});

describe('parseDesign: messages name the field', () => {
  it('rejects an unknown key and lists the allowed ones', () => {
    const e = inputError(() => parseDesign({ ...example(), seeds: 1 }));
    expect(e.message).toMatch(/^design: unknown key "seeds" \(did you mean "seed"\?\); allowed keys: seed, replicates, factors/);
    expect(e.field).toBe('design.seeds');
  });

  it('rejects a nesting in an unknown factor', () => {
    const input = example();
    input.factors[2].within = 'sites';
    const e = inputError(() => parseDesign(input));
    expect(e.message).toBe('design.factors[2].within: unknown factor "sites"; factors: site, year, plot');
  });

  it('rejects an unknown grouping factor in a variant, with its path', () => {
    const input = example();
    input.variants[1].model.groups[0].factor = 'sites';
    const e = inputError(() => parseDesign(input));
    expect(e.field).toBe('design.variants[1].model.groups[0].factor');
    expect(e.message).toMatch(/unknown factor "sites"; factors: site, year, plot/);
  });

  it('rejects an unknown fixed column in a variant', () => {
    const input = example();
    input.variants[0].model.fixed = ['rain', 'temperature'];
    expect(inputError(() => parseDesign(input)).message).toMatch(/^design\.variants\[0\]\.model\.fixed\[1\]: unknown column "temperature"/);
  });

  it('passes model errors through with the variant path', () => {
    const input = example();
    input.variants[0].model.groups[0].as = 'mixed';
    expect(inputError(() => parseDesign(input)).field).toBe('design.variants[0].model.groups[0].as');
  });

  it('refuses a variant whose response is not the design response', () => {
    const input = example();
    input.variants[0].model.response = 'count';
    expect(inputError(() => parseDesign(input)).message).toMatch(/^design\.variants\[0\]\.model\.response: expected "y"/);
  });

  it('refuses a truth coefficient that matches no column', () => {
    const input = example();
    input.truth.fixed.rainfall = 0.2;
    const e = inputError(() => parseDesign(input));
    expect(e.field).toBe('design.truth.fixed.rainfall');
    expect(e.message).toMatch(/matches no column/);
  });

  it('refuses a truth coefficient on a reference level, naming a valid one', () => {
    const input = example();
    input.truth.fixed = { intercept: 10, 'habitat=dry': 1 };
    const e = inputError(() => parseDesign(input));
    expect(e.message).toMatch(/^design\.truth\.fixed\["habitat=dry"\]: "dry" is the reference level of "habitat"/);
    expect(e.message).toMatch(/habitat=wet/);
  });

  it('refuses a categorical column without a level and an unknown level', () => {
    const input = example();
    input.truth.fixed = { habitat: 1 };
    expect(inputError(() => parseDesign(input)).message).toMatch(/"habitat" is categorical/);
    input.truth.fixed = { 'habitat=swamp': 1 };
    expect(inputError(() => parseDesign(input)).message).toMatch(/no level "swamp"; levels: dry, wet/);
  });

  it('refuses level coefficients in the earlier bracket form, showing the column=level spelling', () => {
    // Project naming rule (README, "Coefficient names"): levels are written column=level.
    const input = example();
    input.truth.fixed = { intercept: 10, 'habitat[wet]': 1 };
    const e = inputError(() => parseDesign(input));
    expect(e.field).toBe('design.truth.fixed["habitat[wet]"]');
    expect(e.message).toMatch(/write "habitat=wet" instead of "habitat\[wet\]"/);
    input.truth.fixed = { 'rain:habitat[wet]': 0.3 };
    expect(inputError(() => parseDesign(input)).message).toMatch(/write "rain:habitat=wet"/);
  });

  it('accepts products and factor levels as truth, and refuses the same product twice', () => {
    const input = example();
    input.truth.fixed = { intercept: 10, 'rain:habitat=wet': 0.3, 'year=year3': -1 };
    expect(parseDesign(input).truth.terms.map((t) => t.canonical)).toEqual(['intercept', 'habitat=wet:rain', 'year=year3']);
    input.truth.fixed = { 'rain:habitat=wet': 0.3, 'habitat=wet:rain': 0.3 };
    expect(inputError(() => parseDesign(input)).message).toMatch(/the same coefficient as "rain:habitat=wet"/);
  });

  it('warns about variant coefficients that have no truth', () => {
    const input = example();
    input.truth.fixed = { intercept: 10, rain: 0.5 };
    const d = parseDesign(input);
    expect(d.warnings).toHaveLength(2);
    expect(d.warnings[0]).toBe('design.variants[0] ("year random"): no truth for habitat=wet; taken as 0');
    expect(d.variants[0].truth['habitat=wet']).toBe(0);
  });

  it('requires the family parameters in truth.sd', () => {
    const input = example();
    delete input.truth.sd.residual;
    expect(inputError(() => parseDesign(input)).message).toBe(
      'design.truth.sd.residual: expected a number ≥ 0 (required by the gaussian family)',
    );
  });

  it('refuses an unknown family', () => {
    expect(inputError(() => parseDesign({ ...example(), family: 'gamma' })).message).toMatch(/^design\.family: expected one of "gaussian", "poisson"/);
  });

  it('refuses category probabilities that do not sum to 1', () => {
    const input = example();
    input.covariates[1].categories = { dry: 0.5, wet: 0.6 };
    expect(inputError(() => parseDesign(input)).message).toMatch(/^design\.covariates\[1\]\.categories: probabilities must sum to 1/);
  });

  it('refuses a covariate with two distributions or none', () => {
    const input = example();
    input.covariates[0].uniform = { min: 0, max: 1 };
    expect(inputError(() => parseDesign(input)).message).toMatch(/^design\.covariates\[0\]: give exactly one of normal, uniform, categories \(got normal and uniform\)/);
  });

  it('refuses a between share of a non-normal covariate or with a factor the unit is not nested in', () => {
    const input = example();
    input.covariates[1].between = { factor: 'site', share: 0.5 };
    expect(inputError(() => parseDesign(input)).field).toBe('design.covariates[1].between');
    const other = example();
    other.covariates.push({ name: 'soil', varies: 'plot', normal: { mean: 0, sd: 1 }, between: { factor: 'year', share: 0.5 } });
    expect(inputError(() => parseDesign(other)).message).toMatch(/^design\.covariates\[2\]\.between\.factor: a covariate that varies by "plot"/);
    other.covariates[2].between.factor = 'site';
    expect(parseDesign(other).covariates[2]).toMatchObject({ between: { factor: 'site', share: 0.5, correlation: 0 } });
  });

  it('names the new spelling for the earlier "confounding" and "strength"', () => {
    const old = example();
    old.covariates.push({ name: 'soil', varies: 'plot', normal: { mean: 0, sd: 1 }, confounding: { factor: 'site', strength: 0.5 } });
    const e = inputError(() => parseDesign(old));
    expect(e.field).toBe('design.covariates[2].confounding');
    expect(e.message).toMatch(/renamed to "between".*"share": 0\.8/);
    const half = example();
    half.covariates.push({ name: 'soil', varies: 'plot', normal: { mean: 0, sd: 1 }, between: { factor: 'site', strength: 0.5 } });
    expect(inputError(() => parseDesign(half)).message).toMatch(/between\.strength: renamed to "share"/);
  });

  it('checks the correlation with the factor effect: within [-1, 1] and only with a random intercept in truth', () => {
    const input = example();
    input.covariates.push({ name: 'soil', varies: 'observation', normal: { mean: 0, sd: 1 }, between: { factor: 'site', share: 0.5, correlation: 1.5 } });
    expect(inputError(() => parseDesign(input)).field).toBe('design.covariates[2].between.correlation');
    input.covariates[2].between.correlation = 0.4;
    expect(parseDesign(input).covariates[2]).toMatchObject({ between: { factor: 'site', share: 0.5, correlation: 0.4 } });
    const noSd = example();
    noSd.covariates.push({ name: 'soil', varies: 'observation', normal: { mean: 0, sd: 1 }, between: { factor: 'plot', share: 0.5, correlation: 0.4 } });
    delete noSd.truth.sd.plot;
    expect(inputError(() => parseDesign(noSd)).message).toMatch(/between\.correlation: correlates "soil" with the random intercept of "plot", but truth\.sd gives "plot" no SD/);
  });

  it('refuses unequal sizes of the wrong length', () => {
    const input = { ...example(), unequal: { factor: 'site', sizes: [1, 2, 3] } };
    expect(inputError(() => parseDesign(input)).message).toBe('design.unequal.sizes: expected 6 sizes (one per level of "site"), got 3');
  });

  it('refuses slopes on a categorical column and correlations that are not semidefinite', () => {
    const input = example();
    input.truth.slopes = { site: { habitat: 0.3 } };
    expect(inputError(() => parseDesign(input)).field).toBe('design.truth.slopes.site.habitat');
    const input2 = example();
    input2.covariates.push({ name: 'temp', varies: 'observation', uniform: { min: 0, max: 1 } });
    input2.truth.slopes = { site: { rain: 0.3, temp: 0.2 } };
    // 0.9, 0.9, -0.9 cannot be correlations of three variables (the matrix has a negative eigenvalue).
    input2.truth.correlations = { site: { 'intercept:rain': 0.9, 'intercept:temp': 0.9, 'rain:temp': -0.9 } };
    expect(inputError(() => parseDesign(input2)).message).toMatch(/^design\.truth\.correlations\.site: these correlations do not form a valid/);
  });

  it('refuses a correlation naming a term without a random slope', () => {
    const input = example();
    input.truth.correlations = { site: { 'intercept:rain': 0.2 } };
    expect(inputError(() => parseDesign(input)).message).toMatch(/among the random terms of "site": intercept/);
  });

  it('warns about a zero residual SD', () => {
    const input = example();
    input.truth.sd.residual = 0;
    expect(parseDesign(input).warnings.some((w) => w.startsWith('design.truth.sd.residual: residual SD is 0'))).toBe(true);
  });
});

describe('semidefiniteCholesky', () => {
  it('reconstructs a positive definite matrix (L Lᵀ = A)', () => {
    // Reconstruction identity of the Cholesky factor (Golub and Van Loan, section 4.2).
    const a = Float64Array.from([4, 2, 0.4, 2, 5, 1, 0.4, 1, 3]);
    const l = semidefiniteCholesky(a, 3)!;
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) {
        let s = 0;
        for (let m = 0; m < 3; m++) s += l[i * 3 + m] * l[j * 3 + m];
        expect(s).toBeCloseTo(a[i * 3 + j], 12);
      }
    }
  });

  it('handles a correlation of 1 (singular but semidefinite) and a zero variance', () => {
    const l = semidefiniteCholesky(Float64Array.from([1, 0.5, 0.5, 0.25]), 2)!;
    expect(Array.from(l)).toEqual([1, 0, 0.5, 0]);
    expect(Array.from(semidefiniteCholesky(Float64Array.from([0, 0, 0, 4]), 2)!)).toEqual([0, 0, 0, 2]);
    expect(semidefiniteCholesky(Float64Array.from([1, 2, 2, 1]), 2)).toBeNull();
  });
});

describe('survey sizes are checked before anything is allocated', () => {
  const small = {
    seed: 1, replicates: 10, factors: [{ name: 'site', levels: 6 }], perCell: 2,
    truth: { fixed: { intercept: 1 }, sd: { site: 1, residual: 1 } },
    variants: [{ name: 'v', model: { response: 'y', groups: [{ factor: 'site', as: 'random' }] } }],
  };
  it('a factor of 1e9 levels and a survey of 2e8 rows are refused with the memory they would need', () => {
    // Project limits (design/size-limits.ts); 1e9 labels × 64 bytes = 64 GB (arithmetic).
    const e = inputError(() => parseDesign({ ...small, factors: [{ name: 'site', levels: 1e9 }] }));
    expect(e.message).toBe('design.factors[0].levels: factor "site" would have 1,000,000,000 levels, beyond the limit of 1,000,000; its labels alone would need about 64 GB in memory');
    expect(e.field).toBe('design.factors[0].levels');
    const rows = inputError(() => parseDesign({ ...small, factors: [{ name: 'site', levels: 1e5 }, { name: 'year', levels: 1000 }] }));
    expect(rows.message).toMatch(/^design\.factors: a simulated data set would have 200,000,000 rows .* beyond the limit of 10,000,000; it would need about \d+ GB in memory$/);
    expect(inputError(() => parseDesign({ ...small, perCell: 1e9 })).field).toBe('design.factors');
  });
});
