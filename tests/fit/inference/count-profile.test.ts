/**
 * Profile-likelihood intervals of count fits (kernel-lib/fit/inference/count-profile.ts) against a
 * brute-force profile computed independently with statsmodels and scipy
 * (./count-profile-reference.py, run here through /usr/bin/python3).
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'child_process';
import { join } from 'path';
import { readCsvFile } from '../../../kernel-lib/data/csv';
import { fitModel } from '../../../kernel-lib/analyse/fit-model';
import type { ModelSpec } from '../../../kernel-lib/model/types';

const COUNTS = join(__dirname, '..', '..', '..', 'data', 'reference', 'counts');
const CHI2_95 = 3.841458820694124; // scipy 1.10.1: stats.chi2.ppf(0.95, 1)

function table(name: string): Record<string, unknown[]> {
  const t = readCsvFile(join(COUNTS, `${name}.csv`)) as unknown as Record<string, unknown[]>;
  if (t.effort) t.log_effort = (t.effort as number[]).map((e) => Math.log(e));
  return t;
}

interface BruteForce {
  glm: [number, number][];
  glmm: { mle: number[]; llf: number; x: [number, number]; sd: [number, number] };
}

let cached: BruteForce | null = null;
function bruteForce(): BruteForce {
  if (cached) return cached;
  const run = spawnSync('/usr/bin/python3', [join(__dirname, 'count-profile-reference.py'), join(COUNTS, 'poisson-groups.csv'), '0.95'], { encoding: 'utf8' });
  if (run.status !== 0) throw new Error(`count-profile-reference.py failed: ${run.stderr}`);
  cached = JSON.parse(run.stdout) as BruteForce;
  return cached;
}

const poisson: ModelSpec = { response: 'y', family: 'poisson', offset: 'log_effort', fixed: ['x'], groups: [{ factor: 'g', as: 'random' }] };

describe('profile intervals for count fits', () => {
  it('a Poisson GLM with offset: limits equal the statsmodels GLM likelihood-ratio limits (scipy brentq)', () => {
    const ref = bruteForce().glm;
    const fit = fitModel(table('poisson-groups'), { ...poisson, groups: [], interval: 'profile' });
    fit.fixed.forEach((r, j) => {
      expect(r.method).toBe('profile');
      expect(Math.abs(r.lower - ref[j][0])).toBeLessThan(1e-7);
      expect(Math.abs(r.upper - ref[j][1])).toBeLessThan(1e-7);
    });
    // the profile interval is not the Wald interval (asymmetric around the estimate)
    const wald = fitModel(table('poisson-groups'), { ...poisson, groups: [] });
    expect(Math.abs(wald.fixed[0].lower - fit.fixed[0].lower)).toBeGreaterThan(1e-3);
  }, 120_000);

  it('a Poisson random intercept by 25-node quadrature: slope and group-SD limits equal the brute-force profile', () => {
    const ref = bruteForce().glmm;
    const fit = fitModel(table('poisson-groups'), { ...poisson, integration: 'quadrature', nodes: 25, interval: 'profile' });
    // same maximum first (40-node adaptive Gauss-Hermite marginal likelihood in the script)
    expect(Math.abs(fit.logLik - ref.llf)).toBeLessThan(1e-6);
    const slope = fit.fixed[1];
    expect(Math.abs(slope.lower - ref.x[0])).toBeLessThan(2e-4);
    expect(Math.abs(slope.upper - ref.x[1])).toBeLessThan(2e-4);
    const sd = fit.random[0];
    expect(Math.abs(sd.lower! - ref.sd[0])).toBeLessThan(2e-4);
    expect(Math.abs(sd.upper! - ref.sd[1])).toBeLessThan(2e-4);
    expect(fit.warnings).toEqual([]);
  }, 120_000);

  it('with the Laplace approximation the limits are close to the quadrature ones (same data: Laplace is accurate here)', () => {
    const ref = bruteForce().glmm;
    const fit = fitModel(table('poisson-groups'), { ...poisson, interval: 'profile' });
    // Laplace versus exact integration differ by O(1/n_g) (Pinheiro and Bates 1995, §3): loose agreement only
    expect(Math.abs(fit.fixed[1].lower - ref.x[0])).toBeLessThan(0.02);
    expect(Math.abs(fit.random[0].upper! - ref.sd[1])).toBeLessThan(0.02);
  }, 120_000);

  it('a group SD whose profile never rises enough toward 0 gets lower limit 0 and the reason', () => {
    // Poisson counts with no group variation at all: the GLM (SD = 0) is within the cutoff of the maximum
    const g: string[] = [];
    const y: number[] = [];
    const counts = [3, 4, 2, 5, 3, 4, 3, 2, 4, 3, 5, 2, 3, 4, 3, 3, 2, 4, 4, 3, 3, 5, 2, 4];
    counts.forEach((c, i) => { g.push(`s${i % 6}`); y.push(c); });
    const model: ModelSpec = { response: 'y', family: 'poisson', groups: [{ factor: 'g', as: 'random' }], interval: 'profile' };
    const fit = fitModel({ g, y }, model);
    const glm = fitModel({ g, y }, { ...model, groups: [], interval: 'wald' });
    // identity (Pawitan 2001, §2.4): the lower limit is 0 exactly when 2(ℓ̂ − ℓ(SD = 0)) < χ²₁(0.95)
    expect(2 * (fit.logLik - glm.logLik)).toBeLessThan(CHI2_95);
    expect(fit.random[0].lower).toBe(0);
    expect(fit.random[0].upper!).toBeGreaterThan(fit.random[0].sd);
    expect(fit.warnings.some((w) => /sd\(g\).*lower limit is the boundary 0/.test(w))).toBe(true);
  });
});
