import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, readdirSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { spawn, spawnSync } from 'node:child_process';
import { runStudy, studyFingerprint } from '../../kernel-lib/study/run-study';
import { mergeShards } from '../../kernel-lib/study/merge-shards';
import { parseShard } from '../../kernel-lib/study/batch-plan';
import { fingerprintOf } from '../../kernel-lib/study/study-folder';

const ROOT = join(__dirname, '..', '..');
const fresh = (name: string) => join(mkdtempSync(join(tmpdir(), 'quadrat-study-')), name);
const replicates = (folder: string) => readFileSync(join(folder, 'replicates.csv'), 'utf8');

/** A small crossed design with a site-level category that can make a replicate fail (all sites alike). */
const design = {
  seed: 7, replicates: 60,
  factors: [{ name: 'site', levels: 5 }, { name: 'year', levels: 3 }],
  perCell: 2, missing: 0.05,
  covariates: [
    { name: 'rain', varies: 'observation', normal: { mean: 0, sd: 1 } },
    { name: 'habitat', varies: 'site', categories: { dry: 0.5, wet: 0.5 } },
  ],
  truth: { fixed: { intercept: 10, rain: 0.5, 'habitat=wet': 1 }, sd: { site: 1, year: 0.5, residual: 2 } },
  variants: [
    { name: 'year random', model: { response: 'y', fixed: ['rain', 'habitat'], groups: [{ factor: 'site', as: 'random' }, { factor: 'year', as: 'random' }] } },
    { name: 'year fixed', model: { response: 'y', fixed: ['rain', 'habitat'], groups: [{ factor: 'site', as: 'random' }, { factor: 'year', as: 'fixed' }] } },
  ],
  grid: { 'factors.year.levels': [3, 4] },
};

describe('study runner determinism (same seed, same numbers)', () => {
  it('1 worker and 2 workers give byte-identical per-replicate results', async () => {
    const a = fresh('w1');
    const b = fresh('w2');
    const ra = await runStudy(design, { out: a, workers: 1, batchSize: 10 });
    const rb = await runStudy(design, { out: b, workers: 2, batchSize: 10 });
    expect(ra.complete && rb.complete).toBe(true);
    expect(replicates(a)).toBe(replicates(b));
    expect(readFileSync(join(a, 'metrics.csv'), 'utf8')).toBe(readFileSync(join(b, 'metrics.csv'), 'utf8'));
    // 2 scenarios × 60 replicates × 2 variants × (3 fixed + year dummies + SDs) rows, header included
    expect(replicates(a).split('\n').length).toBeGreaterThan(2 * 60 * 2 * 5);
  });

  it('three shards merged equal one straight run', async () => {
    const straight = fresh('straight');
    await runStudy(design, { out: straight, workers: 1, batchSize: 10 });
    const shards = [1, 2, 3].map((i) => fresh(`shard${i}`));
    for (let i = 0; i < 3; i++) {
      const r = await runStudy(design, { out: shards[i], workers: 1, batchSize: 10, shard: parseShard(`${i + 1}/3`) });
      expect(r.metrics).toBeNull();
    }
    const merged = fresh('merged');
    mergeShards(shards, merged);
    expect(replicates(merged)).toBe(replicates(straight));
  });

  it('an interrupted run resumed with the same settings equals a straight run', async () => {
    const straight = fresh('straight');
    await runStudy(design, { out: straight, workers: 1, batchSize: 10 });
    const resumed = fresh('resumed');
    const controller = new AbortController();
    let seen = 0;
    const first = await runStudy(design, {
      out: resumed, workers: 1, batchSize: 10, signal: controller.signal,
      onProgress: (p) => { if (p.done > 0 && ++seen === 3) controller.abort(); },
    });
    expect(first.interrupted).toBe(true);
    expect(existsSync(join(resumed, 'replicates.csv'))).toBe(false);
    const second = await runStudy(design, { out: resumed, workers: 2, batchSize: 10 });
    expect(second.batchesSkipped).toBeGreaterThan(0);
    expect(second.complete).toBe(true);
    expect(replicates(resumed)).toBe(replicates(straight));
  });

  it('kill -9 of the command line mid-run, then the same command, ends with the straight results', async () => {
    const bin = join(ROOT, 'bin', 'quadrat.js');
    const designFile = join(mkdtempSync(join(tmpdir(), 'quadrat-design-')), 'design.json');
    require('node:fs').writeFileSync(designFile, JSON.stringify({ ...design, replicates: 400 }));
    const straight = fresh('straight');
    const ok = spawnSync(process.execPath, [bin, 'study', 'run', designFile, '--out', straight, '--workers', '1'], { encoding: 'utf8' });
    expect(ok.status).toBe(0);
    const killed = fresh('killed');
    const child = spawn(process.execPath, [bin, 'study', 'run', designFile, '--out', killed, '--workers', '2'], { stdio: 'ignore' });
    await new Promise<void>((resolve) => {
      const poll = setInterval(() => {
        const dir = join(killed, 'batches');
        if (existsSync(dir) && readdirSync(dir).filter((f) => f.endsWith('.csv')).length >= 3) {
          clearInterval(poll);
          child.kill('SIGKILL');
          resolve();
        }
      }, 5);
    });
    await new Promise((resolve) => child.on('exit', resolve));
    const partial = readdirSync(join(killed, 'batches')).filter((f) => f.endsWith('.csv')).length;
    expect(partial).toBeLessThan(32); // 2 scenarios × 16 batches: the run really was cut short
    const again = spawnSync(process.execPath, [bin, 'study', 'run', designFile, '--out', killed, '--workers', '2'], { encoding: 'utf8' });
    expect(again.status).toBe(0);
    expect(replicates(killed)).toBe(replicates(straight));
  });

  it('a failing fit is recorded with its reason and the study goes on', async () => {
    const out = fresh('failing');
    const r = await runStudy({ ...design, replicates: 40 }, { out, workers: 1 });
    expect(r.complete).toBe(true);
    const text = replicates(out);
    // with 5 sites and P(wet) = 0.5, some replicates draw a single habitat (probability 2 × 0.5⁵ each)
    const failed = text.split('\n').filter((l) => l.includes(',failed,'));
    expect(failed.length).toBeGreaterThan(0);
    expect(failed[0]).toContain('habitat');
    // the run says so out loud, with the share and the reason (failed replicates counted once each)
    const share = r.metrics!.find((m) => m.metric === 'failureShare' && m.value > 0)!;
    const warning = r.warnings.find((w) => w.includes(`variant "${share.variant}" (scenario ${share.scenario})`))!;
    expect(warning).toContain(`${Math.round(share.value * share.n)} of ${share.n} fits failed (${(100 * share.value).toFixed(1)}%)`);
    expect(warning).toMatch(/most common reasons: .*habitat.*\(\d+\)/);
  });

  it('refuses a folder that holds another study', async () => {
    const out = fresh('other');
    await runStudy({ ...design, replicates: 5 }, { out, workers: 1 });
    await expect(runStudy({ ...design, replicates: 6 }, { out, workers: 1 })).rejects.toThrow(/different study/);
  });
});

describe('study validation before anything runs', () => {
  it('refuses an interval method the engine does not provide, naming the variant field', async () => {
    const bad = { ...design, variants: [{ name: 'v', model: { ...design.variants[0].model, interval: 'magic' } }] };
    await expect(runStudy(bad, { out: fresh('bad'), workers: 1 })).rejects.toThrow(/design\.variants\[0\]\.model\.interval/);
  });
});

describe('study identity', () => {
  it('the same design JSON resolved with other defaults (here the interval method) is a different study', () => {
    const a = fingerprintOf(design, 5, 25, [{ name: 'v', model: { interval: 'satterthwaite' } }]);
    const b = fingerprintOf(design, 5, 25, [{ name: 'v', model: { interval: 'wald' } }]);
    expect(a).not.toBe(b);
    expect(fingerprintOf(design, 5, 25, [{ name: 'v', model: { interval: 'wald' } }])).toBe(b);
  });

  it('a folder written with different variant settings is refused', async () => {
    const out = fresh('identity');
    await runStudy({ ...design, replicates: 5 }, { out, workers: 1 });
    const manifest = JSON.parse(readFileSync(join(out, 'study.json'), 'utf8'));
    expect(manifest.fingerprint).toBe(studyFingerprint({ ...design, replicates: 5 }));
    const changed = { ...design, replicates: 5, variants: design.variants.map((v) => ({ ...v, model: { ...v.model, interval: 'wald' } })) };
    await expect(runStudy(changed, { out, workers: 1 })).rejects.toThrow(/different study/);
  });
});

describe('variance components and correlations in studies', () => {
  it('writes the SD intervals of profile fits and the estimated correlations, with their metrics and MCSEs', async () => {
    const input = {
      seed: 31, replicates: 24,
      factors: [{ name: 'site', levels: 10 }], perCell: 6,
      covariates: [{ name: 'x', varies: 'observation', normal: { mean: 0, sd: 1 } }],
      truth: { fixed: { intercept: 1, x: 0.5 }, sd: { site: 1, residual: 1 }, slopes: { site: { x: 0.5 } }, correlations: { site: { 'intercept:x': 0.3 } } },
      variants: [
        { name: 'profile', model: { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'random' }], interval: 'profile' } },
        { name: 'slopes', model: { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'random', slopes: ['x'] }] } },
      ],
    };
    const r = await runStudy(input, { out: fresh('sd-rows'), workers: 1 });
    const sdRows = r.replicates!.filter((row) => row.variant === 'profile' && row.parameter === 'sd(site)' && row.status !== 'failed');
    // a profile interval contains its own estimate (common practice, no source)
    expect(sdRows.length).toBeGreaterThan(0);
    for (const row of sdRows) {
      expect(row.lower).toBeLessThanOrEqual(row.estimate + 1e-9);
      expect(row.upper).toBeGreaterThanOrEqual(row.estimate - 1e-9);
    }
    const metric = (variant: string, parameter: string, name: string) =>
      r.metrics!.find((m) => m.variant === variant && m.parameter === parameter && m.metric === name);
    for (const name of ['coverage', 'width']) {
      const m = metric('profile', 'sd(site)', name)!;
      expect(Number.isFinite(m.value) && Number.isFinite(m.mcse)).toBe(true);
    }
    const cor = r.replicates!.filter((row) => row.variant === 'slopes' && row.parameter === 'cor(site:intercept,x)');
    expect(cor.length).toBe(24);
    expect(cor.every((row) => row.kind === 'correlation' && row.truth === 0.3)).toBe(true);
    for (const name of ['mean', 'bias', 'empiricalSE', 'rmse']) {
      const m = metric('slopes', 'cor(site:intercept,x)', name)!;
      expect(Number.isFinite(m.value) && Number.isFinite(m.mcse)).toBe(true);
    }
    // the CSV keeps the kind, so the metrics read back from disk are the same
    expect(readFileSync(join(r.folder, 'replicates.csv'), 'utf8')).toContain('"cor(site:intercept,x)",correlation,0.3');
  });
});
