import { describe, expect, it } from 'vitest';
import { parseDesign } from '../../kernel-lib/design/parse';
import { BASE_SCENARIO_KEY } from '../../kernel-lib/design/grid';
import { variantLevels } from '../../kernel-lib/study/variant-levels';

/** Invented survey: 6 sites × 2 years, two variants with different interval levels. */
const design = (grid?: Record<string, unknown[]>) => parseDesign({
  seed: 1, replicates: 5,
  factors: [{ name: 'site', levels: 6 }, { name: 'year', levels: 2 }],
  truth: { fixed: { intercept: 1 }, sd: { site: 1, residual: 1 } },
  variants: [
    { name: 'default', model: { response: 'y', groups: [{ factor: 'site', as: 'random' }] } },
    { name: 'ninety', model: { response: 'y', groups: [{ factor: 'site', as: 'random' }], level: 0.9 } },
  ],
  ...(grid ? { grid } : {}),
});

// Each variant's coverage is judged against its own nominal level (Morris, White and Crowther 2019,
// Stat. Med. 38:2074, §5.2 coverage); 0.95 is the model's documented default level.
describe('variantLevels', () => {
  it('gives each variant its own level in the single scenario', () => {
    expect(variantLevels(design())).toEqual({ [BASE_SCENARIO_KEY]: { default: 0.95, ninety: 0.9 } });
  });

  it('follows a grid that changes a variant level scenario by scenario', () => {
    const levels = variantLevels(design({ 'variants.ninety.model.level': [0.8, 0.99] }));
    expect(Object.values(levels)).toEqual([{ default: 0.95, ninety: 0.8 }, { default: 0.95, ninety: 0.99 }]);
    expect(Object.keys(levels)).toEqual(['variants.ninety.model.level=0.8', 'variants.ninety.model.level=0.99']);
  });
});
