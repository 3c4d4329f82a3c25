import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { studyCommand } from '../../kernel-lib/cli/study-command';
import { inputError } from '../helpers/input-error';

const tmp = mkdtempSync(join(tmpdir(), 'quadrat-cli-plan-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

// An invented design: 4 observations per site, a site-level covariate, site random.
const design = {
  seed: 5, replicates: 25, factors: [{ name: 'site', levels: 8 }], perCell: 4,
  covariates: [{ name: 'canopy', varies: 'site', normal: { mean: 0, sd: 1 } }],
  truth: { fixed: { intercept: 5, canopy: 1 }, sd: { site: 0.5, residual: 1 } },
  variants: [
    { name: 'site random', model: { response: 'y', fixed: ['canopy'], groups: [{ factor: 'site', as: 'random' }] } },
    { name: 'site ignored', model: { response: 'y', fixed: ['canopy'] } },
  ],
};

async function run(argv: string[]): Promise<{ code: number; text: string }> {
  const lines: string[] = [];
  const code = await studyCommand(argv, (s) => lines.push(s));
  return { code, text: lines.join('\n') };
}

describe('quadrat study plan', () => {
  it('writes plan.json, a curve spec and a report, and prints the answer', async () => {
    const file = join(tmp, 'design.json');
    writeFileSync(file, JSON.stringify({ ...design, plan: { vary: 'factors.site.levels', values: [4, 8, 16, 32], variant: 'site random', parameter: 'canopy', metric: 'power', atLeast: 0.8, replicates: 25, maxReplicates: 100 } }));
    const out = join(tmp, 'plan');
    const { code, text } = await run(['plan', file, '--out', out, '--workers', '1']);
    expect(code).toBe(0);
    const plan = JSON.parse(readFileSync(join(out, 'plan.json'), 'utf8'));
    expect(Object.keys(plan).slice(0, 4)).toEqual(['format', 'smallest', 'find', 'decided']);
    expect(text).toContain(plan.sentence);
    expect(existsSync(join(out, 'plan-curve-1.vl.json'))).toBe(true);
    const html = readFileSync(join(out, 'report.html'), 'utf8');
    // the answer comes before the chart and the table
    expect(html.indexOf('The answer')).toBeLessThan(html.indexOf('<svg'));
    expect(html).toContain('qualified statistician');
  }, 300_000);

  it('names the field of a bad plan block', async () => {
    const file = join(tmp, 'bad.json');
    writeFileSync(file, JSON.stringify({ ...design, plan: { vary: 'factors.site.levels', values: [4, 8], variant: 'site random', parameter: 'sd(site)', metric: 'power', atLeast: 0.8 } }));
    const e = await run(['plan', file, '--out', join(tmp, 'bad')]).catch((x: unknown) => x);
    expect(inputError(() => { throw e; }).field).toBe('plan.metric');
  });
});

describe('quadrat study summary', () => {
  it('prints the reading before the metrics table', async () => {
    const folder = join(tmp, 'study');
    writeFileSync(join(tmp, 'study.json'), JSON.stringify(design));
    expect((await run(['run', join(tmp, 'study.json'), '--out', folder, '--workers', '1'])).code).toBe(0);
    const { code, text } = await run(['summary', folder]);
    expect(code).toBe(0);
    expect(text.indexOf('`')).toBe(-1);
    expect(text.startsWith('canopy:')).toBe(true);
    expect(text.indexOf('Rule: a variant keeps coverage')).toBeGreaterThan(0);
    expect(text.indexOf('qualified statistician')).toBeLessThan(text.search(/^\s*scenario\s+variant\s+parameter/m));
  }, 300_000);
});
