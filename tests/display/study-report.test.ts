import { describe, expect, it } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runStudy } from '../../kernel-lib/study/run-study';
import { readStudyFolder, studyReportHtml } from '../../kernel-lib/display/study-report';
import { formatMetricsTable } from '../../kernel-lib/cli/metrics-table';

// Invented survey: 5 sites, a site-level habitat drawn at random (so some replicates have one
// habitat only and their fits fail), and a variant with site fixed that cannot estimate habitat.
const design = {
  seed: 41, replicates: 60,
  factors: [{ name: 'site', levels: 5 }, { name: 'year', levels: 3 }], perCell: 2,
  covariates: [
    { name: 'rain', varies: 'observation', normal: { mean: 0, sd: 1 } },
    { name: 'habitat', varies: 'site', categories: { dry: 0.5, wet: 0.5 } },
  ],
  truth: { fixed: { intercept: 10, rain: 0.5, 'habitat=wet': 1 }, sd: { site: 1, residual: 1 } },
  variants: [
    { name: 'site random', model: { response: 'y', fixed: ['rain', 'habitat'], groups: [{ factor: 'site', as: 'random' }] } },
    { name: 'site fixed', model: { response: 'y', fixed: ['rain', 'habitat'], groups: [{ factor: 'site', as: 'fixed' }] } },
  ],
  grid: { 'factors.year.levels': [3, 4] },
};

describe('study report and summary table', () => {
  it('say that fits failed before any metric, and keep a coefficient one variant cannot estimate', async () => {
    const folder = mkdtempSync(join(tmpdir(), 'quadrat-report-'));
    const r = await runStudy(design, { out: folder, workers: 1 });
    // P(all 5 sites alike) = 2 × 0.5⁵ per replicate: some of 120 replicates fail (common practice, no source)
    expect(r.metrics!.some((m) => m.metric === 'failureShare' && m.value > 0)).toBe(true);
    const html = await studyReportHtml(readStudyFolder(folder));
    const failedAt = html.indexOf('Failed fits');
    expect(failedAt).toBeGreaterThan(0);
    expect(failedAt).toBeLessThan(html.indexOf('The answer in plain words'));
    expect(html).toMatch(/fits failed \(\d+\.\d%\); most common reasons:/);
    // habitat=wet is charted although only 'site random' estimates it, with the reason for the gap
    expect(html).toContain('Coverage of habitat=wet');
    expect(html).toContain('Not estimable with <strong>site fixed</strong>');
    // the summary has a truth column and every parameter (rain's truth is 0.5 in the design above)
    const summary = html.slice(html.indexOf('<h2>Summary</h2>'), html.indexOf('</table>', html.indexOf('<h2>Summary</h2>')));
    expect(summary).toMatch(/<th[^>]*>truth<\/th>/);
    for (const p of ['intercept', 'rain', 'habitat=wet', 'sd(site)', 'sd(residual)']) expect(summary).toContain(`>${p}<`);
    expect(summary).toMatch(/>rain<\/td><td[^>]*>0\.5<\/td>/);
    // the long table of every metric is folded away at the end; no scenario key with dotted paths is shown
    expect(html).toMatch(/<h2>Appendix: all metrics<\/h2>[\s\S]*<details><summary>Show the table \(\d+ rows\)<\/summary>/);
    expect(html).not.toContain('factors.year.levels=');
    const table = formatMetricsTable(r.metrics!);
    expect(table.split('\n')[0]).toMatch(/parameter\s+truth\s+coverage/);
    const line = table.split('\n').find((l) => l.includes('site fixed') && l.includes('habitat=wet'))!;
    expect(line).toContain('not estimable');
  });
});

describe('report of a count study', () => {
  it('names the variant on another scale, keeps only its power, and carries the count cautions', async () => {
    const folder = mkdtempSync(join(tmpdir(), 'quadrat-report-count-'));
    // invented: 12 sites × 3 visits of nest counts, analysed as counts and as normal
    await runStudy({
      seed: 4, replicates: 10,
      factors: [{ name: 'site', levels: 12 }], perCell: 3,
      covariates: [{ name: 'x', varies: 'observation', normal: { mean: 0, sd: 1 } }],
      family: 'poisson',
      truth: { fixed: { intercept: 1, x: 0.3 }, sd: { site: 0.3 } },
      variants: [
        { name: 'counts', model: { response: 'y', family: 'poisson', fixed: ['x'], groups: [{ factor: 'site', as: 'random' }] } },
        { name: 'as normal', model: { response: 'y', fixed: ['x'], groups: [{ factor: 'site', as: 'random' }] } },
      ],
    }, { out: folder, workers: 1 });
    const html = await studyReportHtml(readStudyFolder(folder));
    expect(html).toMatch(/Only power and type I error for <strong>as normal<\/strong>: on another scale than the truth/);
    expect(html).toMatch(/poisson responses were drawn exactly from that family/);
    expect(html).toMatch(/Wald intervals of mixed models for counts and detections are approximate/);
  }, 60_000);
});
