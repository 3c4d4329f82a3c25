import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseDesign } from '../../kernel-lib/design/parse';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { planFromPilot } from '../../kernel-lib/study/plan-pilot';
import { ReplicateRunner } from '../../kernel-lib/study/replicate-runner';
import { inputError } from '../helpers/input-error';

const tmp = mkdtempSync(join(tmpdir(), 'quadrat-pilot-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

// An invented pilot: 8 sites, 4 plots each, a site-level covariate (canopy), simulated once.
const pilotDesign = parseDesign({
  seed: 'pilot', replicates: 1, factors: [{ name: 'site', levels: 8 }], perCell: 4,
  covariates: [{ name: 'canopy', varies: 'site', normal: { mean: 0, sd: 1 } }],
  truth: { fixed: { intercept: 5, canopy: 0.8 }, sd: { site: 0.8, residual: 1 } },
  variants: [{ name: 'pilot', model: { response: 'y', fixed: ['canopy'], groups: [{ factor: 'site', as: 'random' }] } }],
});
const pilot = new ReplicateRunner(pilotDesign).simulate(0, 0).columns;
const model = { response: 'y', fixed: ['canopy'], groups: [{ factor: 'site', as: 'random' as const }] };
const plan = { vary: 'factors.site.levels', values: [8, 16, 24, 32, 48, 64], variant: 'as in the pilot model', parameter: 'canopy', metric: 'power', atLeast: 0.8, replicates: 50, maxReplicates: 200 };

describe('planFromPilot', () => {
  it('plans at the lower end, the estimate and the upper end of the pilot SD interval', async () => {
    const out = await planFromPilot(pilot, model, plan, { out: tmp, sdOf: 'site', workers: 1, seed: 3 });
    // the interval ends are those of the profile-likelihood interval of the pilot fit itself
    const profiled = fitModel(pilot, { ...model, interval: 'profile' }).random.find((r) => r.factor === 'site')!;
    expect(out.sd.lower).toBeCloseTo(profiled.lower!, 10);
    expect(out.sd.upper).toBeCloseTo(profiled.upper!, 10);
    expect(out.cases.map((c) => c.case)).toEqual(['lower end', 'estimate', 'upper end']);
    expect(out.cases[0].sd).toBeLessThan(out.cases[1].sd);
    expect(out.cases[1].sd).toBeLessThan(out.cases[2].sd);
    // a larger between-site SD never needs fewer sites for the same power (common practice, no source);
    // a case with no answer counts as needing more than every candidate
    const need = out.cases.map((c) => c.result.answer ?? Infinity);
    expect(need[0]).toBeLessThanOrEqual(need[1]);
    expect(need[1]).toBeLessThanOrEqual(need[2]);
    expect(out.sentence).toMatch(/if the SD of site is as estimated \(/);
    expect(out.sentence).toMatch(/if it is at the upper end of its 95% interval \(/);
  }, 300_000);

  it('refuses a factor that is not random in the model', async () => {
    const e = await planFromPilot(pilot, model, plan, { out: tmp, sdOf: 'plot' }).catch((x: unknown) => x);
    expect(() => { throw e; }).toThrow(/sdOf: "plot" is not a random factor/);
    expect(inputError(() => { throw e; }).field).toBe('sdOf');
  });
});
