/**
 * Variants fitted on another scale than the truth (kernel-lib/study/variant-scales.ts and the
 * otherScale option of kernel-lib/study/metrics.ts): counts analysed as normal keep power and
 * type I error only, and every row of theirs says why.
 */
import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync } from 'fs';
import { tmpdir } from 'os';
import { join } from 'path';
import { ReplicateRunner } from '../../kernel-lib/study/replicate-runner';
import { resolveStudyDesign, runStudy } from '../../kernel-lib/study/run-study';
import { summarise } from '../../kernel-lib/study/metrics';
import { metricsCsvPath } from '../../kernel-lib/study/folder-layout';
import { otherScaleNotes, variantScales } from '../../kernel-lib/study/variant-scales';

const site = { factor: 'site', as: 'random' as const };
// invented: 15 sites × 4 visits, counts with a true effect of x and none of z
const spec = {
  seed: 3, replicates: 40,
  factors: [{ name: 'site', levels: 15 }], perCell: 4,
  covariates: [
    { name: 'x', varies: 'observation', normal: { mean: 0, sd: 1 } },
    { name: 'z', varies: 'observation', normal: { mean: 0, sd: 1 } },
  ],
  family: 'poisson',
  truth: { fixed: { intercept: 0.8, x: 0.4, z: 0 }, sd: { site: 0.4 } },
  variants: [
    { name: 'poisson', model: { response: 'y', family: 'poisson', fixed: ['x', 'z'], groups: [site] } },
    { name: 'as normal', model: { response: 'y', fixed: ['x', 'z'], groups: [site] } },
  ],
};

describe('metrics of a variant on another scale than the truth', () => {
  it('lists only the variants whose link differs from the simulated family, with the reason', () => {
    const { design } = resolveStudyDesign(spec);
    const scales = variantScales(design);
    const [key] = Object.keys(scales);
    expect(Object.keys(scales[key])).toEqual(['as normal']);
    expect(scales[key]['as normal']).toMatch(/gaussian model \(identity link\) fitted to poisson data \(log link\)/);
    // a negative binomial variant of Poisson data shares the log link: same scale (McCullagh and Nelder 1989, §2.2)
    const nb = resolveStudyDesign({ ...spec, variants: [{ name: 'nb', model: { response: 'y', family: 'negative-binomial', fixed: ['x'], groups: [site] } }] }).design;
    expect(variantScales(nb)).toEqual({});
  });

  it('keeps power and type I error (identical to the full summary), drops bias, RMSE, coverage, width, SEs and SD metrics, and says why', () => {
    const { design } = resolveStudyDesign(spec);
    const rows = new ReplicateRunner(design).runBatch(0, 0, 40);
    const full = summarise(rows, { level: 0.95 });
    const kept = summarise(rows, { level: 0.95, otherScale: variantScales(design) });
    const normal = kept.filter((m) => m.variant === 'as normal');
    const metricsOf = (parameter: string) => normal.filter((m) => m.parameter === parameter).map((m) => m.metric);
    expect(metricsOf('x')).toEqual(['power']);
    expect(metricsOf('z')).toEqual(['typeIError']);
    expect(metricsOf('sd(site)')).toEqual([]);
    expect(metricsOf('sd(residual)')).toEqual([]);
    expect(metricsOf('*')).toEqual(['singularShare', 'nonconvergedShare', 'failureShare']);
    for (const m of normal) expect(m.note).toMatch(/^on another scale than the truth/);
    // the test-based values are the ones the full summary computes (same rejections, same replicates)
    for (const m of normal) {
      const same = full.find((f) => f.variant === m.variant && f.parameter === m.parameter && f.metric === m.metric)!;
      expect(m.value).toBe(same.value);
      expect(m.n).toBe(same.n);
    }
    // the variant on the truth's scale is untouched
    expect(kept.filter((m) => m.variant === 'poisson')).toEqual(full.filter((m) => m.variant === 'poisson'));
    expect(otherScaleNotes(kept)).toHaveLength(1);
    expect(otherScaleNotes(kept)[0]).toMatch(/^as normal: on another scale/);
  }, 60_000);

  it('a study writes the reason into the note column of metrics.csv', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'quadrat-scale-'));
    try {
      await runStudy({ ...spec, replicates: 10 }, { out: dir, workers: 1, batchSize: 10 });
      const lines = readFileSync(metricsCsvPath(dir), 'utf8').trim().split('\n');
      expect(lines[0]).toBe('scenario,variant,parameter,kind,metric,value,mcse,n,note');
      const normal = lines.filter((l) => l.includes(',as normal,'));
      expect(normal.length).toBeGreaterThan(0);
      expect(normal.every((l) => /on another scale than the truth/.test(l))).toBe(true);
      expect(normal.some((l) => /,x,fixed,bias,/.test(l))).toBe(false);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 60_000);
});
