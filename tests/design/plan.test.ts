import { describe, expect, it } from 'vitest';
import { parseDesign } from '../../kernel-lib/design/parse';
import { simulateColumns } from '../../kernel-lib/design/simulate';
import { balancedAllocation } from '../../kernel-lib/design/plan';
import { createStream } from '../../kernel-lib/random/stream';

const base = {
  seed: 3, replicates: 10,
  factors: [{ name: 'site', levels: 7 }, { name: 'year', levels: 2 }],
  covariates: [{ name: 'grazing', varies: 'site', categories: { grazed: 0.5, ungrazed: 0.5 }, allocation: 'balanced' }],
  truth: { fixed: { intercept: 1 }, sd: { site: 1, residual: 1 } },
  variants: [{ name: 'v', model: { response: 'y', fixed: ['grazing'], groups: [{ factor: 'site', as: 'random' }] } }],
};

describe('balanced allocation of a site-level category', () => {
  // Largest-remainder (Hamilton) apportionment: 7 × (0.5, 0.5) = (3.5, 3.5) -> (4, 3), ties to the first;
  // 10 × (0.2, 0.3, 0.5) is exact (common practice, no source).
  it('apportions counts by largest remainders', () => {
    expect(Array.from(balancedAllocation([0.5, 0.5], 7))).toEqual([0, 0, 0, 0, 1, 1, 1]);
    expect(Array.from(balancedAllocation([0.2, 0.3, 0.5], 10)).filter((c) => c === 2).length).toBe(5);
    expect(Array.from(balancedAllocation([0.34, 0.33, 0.33], 3))).toEqual([0, 1, 2]);
  });

  it('every replicate has exactly 4 grazed and 3 ungrazed sites, in a different order', () => {
    const design = parseDesign(base);
    const orders = new Set<string>();
    for (let r = 0; r < 40; r++) {
      const data = simulateColumns(design, createStream(3, 'base', r));
      const site = data.columns.site as string[];
      const grazing = data.columns.grazing as string[];
      const bySite = new Map<string, string>();
      site.forEach((s, i) => bySite.set(s, grazing[i]));
      const values = [...bySite.values()];
      expect(values.filter((g) => g === 'grazed').length).toBe(4);
      expect(values.filter((g) => g === 'ungrazed').length).toBe(3);
      orders.add([...bySite.entries()].sort().map((e) => e[1]).join());
    }
    // 35 possible arrangements; 40 uniform shuffles show many of them
    expect(orders.size).toBeGreaterThan(10);
  });

  it('refuses balanced allocation for an observation-level covariate, naming the field', () => {
    const bad = { ...base, covariates: [{ name: 'grazing', varies: 'observation', categories: { a: 0.5, b: 0.5 }, allocation: 'balanced' }] };
    expect(() => parseDesign(bad)).toThrow(/design\.covariates\[0\]\.allocation/);
  });
});
