/**
 * Trials drawn per observation and an effort offset in simulation designs
 * (kernel-lib/design/response-columns.ts, drawn in kernel-lib/design/simulate.ts).
 */
import { describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'fs';
import { tmpdir } from 'os';
import { join } from 'path';
import { ReplicateRunner } from '../../kernel-lib/study/replicate-runner';
import { resolveStudyDesign, runStudy } from '../../kernel-lib/study/run-study';
import { summarise } from '../../kernel-lib/study/metrics';
import { replicatesPath } from '../../kernel-lib/study/folder-layout';
import { inputError } from '../helpers/input-error';

const site = { factor: 'site', as: 'random' as const };

/** Invented survey: 20 sites × 6 visits, effort (hours, log-uniform 1..4) recorded per visit. */
function effortDesign(extra: Record<string, unknown> = {}) {
  return {
    seed: 5, replicates: 100,
    factors: [{ name: 'site', levels: 20 }], perCell: 6,
    covariates: [
      { name: 'x', varies: 'observation', normal: { mean: 0, sd: 1 } },
      { name: 'log_effort', varies: 'observation', uniform: { min: 0, max: Math.log(4) } },
    ],
    family: 'poisson', offset: 'log_effort',
    truth: { fixed: { intercept: 0.5, x: 0.3 }, sd: { site: 0.4 } },
    variants: [
      { name: 'with effort', model: { response: 'y', family: 'poisson', offset: 'log_effort', fixed: ['x'], groups: [site] } },
    ],
    ...extra,
  };
}

function detectionDesign(extra: Record<string, unknown> = {}) {
  return {
    seed: 9, replicates: 40,
    factors: [{ name: 'pond', levels: 25 }], perCell: 4,
    covariates: [{ name: 'x', varies: 'observation', normal: { mean: 0, sd: 1 } }],
    family: 'binomial', trials: { min: 2, max: 6, column: 'visits' },
    truth: { fixed: { intercept: 0, x: 0.5 }, sd: { pond: 0.5 } },
    variants: [{ name: 'detections', model: { response: 'y', family: 'binomial', trials: 'visits', fixed: ['x'], groups: [{ factor: 'pond', as: 'random' }] } }],
    ...extra,
  };
}

describe('trials drawn per observation', () => {
  it('are whole numbers spread uniformly over min..max, the response never exceeds them, and the same replicate gives the same draws', () => {
    const { design } = resolveStudyDesign(detectionDesign());
    const counts = new Array(7).fill(0);
    let total = 0;
    for (let r = 0; r < 40; r++) {
      const data = new ReplicateRunner(design).simulate(0, r);
      const visits = data.columns.visits as Float64Array;
      const y = data.columns.y as Float64Array;
      visits.forEach((m, i) => {
        expect(Number.isInteger(m) && m >= 2 && m <= 6).toBe(true);
        expect(y[i] <= m).toBe(true);
        counts[m]++;
        total++;
      });
    }
    // uniform on 5 values: each share 0.2 ± 4 binomial SEs (common practice, no source)
    for (let m = 2; m <= 6; m++) expect(Math.abs(counts[m] / total - 0.2)).toBeLessThan(4 * Math.sqrt(0.2 * 0.8 / total));
    // the binomial variant reads the drawn column and fits: no failed replicates, slope recovered within 4 MCSE
    const rows = new ReplicateRunner(design).runBatch(0, 0, 40);
    expect(rows.filter((r) => r.status === 'failed')).toEqual([]);
    const bias = summarise(rows, { level: 0.95 }).find((m) => m.parameter === 'x' && m.metric === 'bias')!;
    expect(Math.abs(bias.value)).toBeLessThan(4 * bias.mcse + 0.02);
    const a = new ReplicateRunner(design).simulate(0, 3).columns.visits as Float64Array;
    const b = new ReplicateRunner(design).simulate(0, 3).columns.visits as Float64Array;
    expect(Array.from(a)).toEqual(Array.from(b));
  });

  it('a study with bad count input stops before anything is written', async () => {
    const out = join(mkdtempSync(join(tmpdir(), 'quadrat-bad-')), 'study');
    try {
      await expect(runStudy(detectionDesign({ trials: { min: 0, max: 3 } }), { out, workers: 1 })).rejects.toMatchObject({ field: 'design.trials.min' });
      await expect(runStudy(effortDesign({ offset: 'hours' }), { out, workers: 1 })).rejects.toMatchObject({ field: 'design.offset' });
      expect(existsSync(out)).toBe(false);
    } finally {
      rmSync(join(out, '..'), { recursive: true, force: true });
    }
  });

  it('refuses a bad range, a clashing column, and a binomial variant that does not name the drawn column', () => {
    expect(inputError(() => resolveStudyDesign(detectionDesign({ trials: { min: 0, max: 3 } }))).field).toBe('design.trials.min');
    expect(inputError(() => resolveStudyDesign(detectionDesign({ trials: { min: 4, max: 3 } }))).field).toBe('design.trials.max');
    expect(inputError(() => resolveStudyDesign(detectionDesign({ trials: { min: 1, max: 3, column: 'x' } }))).field).toBe('design.trials.column');
    expect(inputError(() => resolveStudyDesign(detectionDesign({ trials: { min: 1, max: 3, step: 1 } }))).field).toBe('design.trials.step');
    expect(inputError(() => resolveStudyDesign(detectionDesign({ trials: 'many' }))).field).toBe('design.trials');
    const e = inputError(() => resolveStudyDesign(detectionDesign({
      variants: [{ name: 'd', model: { response: 'y', family: 'binomial', trials: 4, fixed: ['x'], groups: [{ factor: 'pond', as: 'random' }] } }],
    })));
    expect(e.field).toBe('design.variants[0].model.trials');
    expect(e.message).toMatch(/"visits"/);
  });
});

describe('an effort covariate as offset', () => {
  it('mean counts scale with effort: the ratio of mean counts between effort bands equals the ratio of mean efforts', () => {
    const { design } = resolveStudyDesign(effortDesign({ truth: { fixed: { intercept: 0.5, x: 0 }, sd: {} } }));
    // E[y | effort] = effort · e^{0.5} · E[e^{0.3x}] with x and effort independent: the ratio of means
    // over effort below and above 2 hours is the ratio of mean efforts (log-uniform on 1..4:
    // E[e | e < 2] = 1/ln 2, E[e | e ≥ 2] = 2/ln 2; ratio 2; identity, no source needed)
    let low = 0, lowN = 0, high = 0, highN = 0;
    for (let r = 0; r < 100; r++) {
      const data = new ReplicateRunner(design).simulate(0, r);
      const off = data.columns.log_effort as Float64Array;
      const y = data.columns.y as Float64Array;
      off.forEach((o, i) => { if (o < Math.log(2)) { low += y[i]; lowN++; } else { high += y[i]; highN++; } });
    }
    const ratio = (high / highN) / (low / lowN);
    // Monte Carlo SE of the ratio of two Poisson-ish means of about 6000 rows each: under 0.04; allow 0.1
    expect(Math.abs(ratio - 2)).toBeLessThan(0.1);
    // and the overall mean is e^{0.5} · E[effort] = e^{0.5} · 3/ln 4 (log-uniform mean (b − a)/ln(b/a))
    const mean = (low + high) / (lowN + highN);
    expect(Math.abs(mean / (Math.exp(0.5) * 3 / Math.log(4)) - 1)).toBeLessThan(0.03);
  });

  it('a Poisson fit with the offset recovers the truth: no bias beyond Monte Carlo error and near-nominal coverage', () => {
    const { design } = resolveStudyDesign(effortDesign({
      variants: [
        { name: 'with effort', model: { response: 'y', family: 'poisson', offset: 'log_effort', fixed: ['x'], groups: [site] } },
        { name: 'no effort', model: { response: 'y', family: 'poisson', fixed: ['x'], groups: [site] } },
      ],
    }));
    const rows = new ReplicateRunner(design).runBatch(0, 0, 100);
    const metrics = summarise(rows, { level: 0.95 });
    const get = (variant: string, parameter: string, metric: string) => metrics.find((m) => m.variant === variant && m.parameter === parameter && m.metric === metric)!;
    for (const parameter of ['intercept', 'x']) {
      const bias = get('with effort', parameter, 'bias');
      expect(Math.abs(bias.value)).toBeLessThan(3 * bias.mcse + 0.01);
      // coverage within 3 MCSE of 0.95 (Morris, White and Crowther 2019, Table 6)
      const cov = get('with effort', parameter, 'coverage');
      expect(Math.abs(cov.value - 0.95)).toBeLessThan(3 * Math.sqrt(0.95 * 0.05 / cov.n) + 0.01);
    }
    // leaving effort out moves the intercept by E[log effort] = ln 4 / 2 ≈ 0.69 (the offset's mean)
    expect(get('no effort', 'intercept', 'bias').value).toBeGreaterThan(0.5);
  });

  it('replicates.csv is the same with 1 or 2 workers, for an offset and for drawn trials', async () => {
    const dirs = [mkdtempSync(join(tmpdir(), 'quadrat-eff-')), mkdtempSync(join(tmpdir(), 'quadrat-eff-'))];
    const read = (d: string) => readFileSync(replicatesPath(d), 'utf8');
    try {
      for (const [name, spec] of [['effort', effortDesign({ replicates: 30 })], ['visits', detectionDesign({ replicates: 30 })]] as const) {
        await runStudy(spec, { out: join(dirs[0], name), workers: 1, batchSize: 10 });
        await runStudy(spec, { out: join(dirs[1], name), workers: 2, batchSize: 10 });
        expect(read(join(dirs[1], name))).toBe(read(join(dirs[0], name)));
      }
    } finally {
      for (const d of dirs) rmSync(d, { recursive: true, force: true });
    }
  }, 180_000);

  it('refuses an offset that is not a numeric covariate, an offset for a normal design, and a variant offset naming no column', () => {
    expect(inputError(() => resolveStudyDesign(effortDesign({ offset: 'effort' }))).field).toBe('design.offset');
    expect(inputError(() => resolveStudyDesign(effortDesign({ offset: 'site' }))).field).toBe('design.offset');
    expect(inputError(() => resolveStudyDesign(effortDesign({ family: 'gaussian', truth: { fixed: { intercept: 0.5, x: 0.3 }, sd: { site: 0.4, residual: 1 } }, variants: [{ name: 'n', model: { response: 'y', fixed: ['x'] } }] }))).field).toBe('design.offset');
    const e = inputError(() => resolveStudyDesign(effortDesign({
      variants: [{ name: 'v', model: { response: 'y', family: 'poisson', offset: 'hours', fixed: ['x'], groups: [site] } }],
    })));
    expect(e.field).toBe('design.variants[0].model.offset');
  });
});
