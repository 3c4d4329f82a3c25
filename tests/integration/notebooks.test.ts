/**
 * The template notebooks in notebooks/: their committed form (outputs cleared, settings first,
 * cautions last), the small helpers they use (kernel-lib/notebook), and an end-to-end render of
 * every notebook with the project's tslab kernel through Debian's nbconvert, which fails on any
 * cell error. Rendering needs /usr/bin/python3 with nbconvert; it is skipped with a message
 * when missing, except under CI, where a missing tool fails the run.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import * as q from '../../kernel-lib/index';
import type { FitResult } from '../../kernel-lib/fit/result';

const ROOT = path.resolve(__dirname, '..', '..');
const NOTEBOOKS = path.join(ROOT, 'notebooks');
const SCRIPT = path.join(ROOT, 'scripts', 'render-notebook.js');
// A kernel start plus tslab's type-checking of every cell takes 10 to 30 s per notebook here;
// the allowance covers slower CI machines.
const RENDER_TIMEOUT_MS = 400_000;

const notebookFiles = fs.readdirSync(NOTEBOOKS).filter((f) => f.endsWith('.ipynb')).sort();
const nbconvertWorks = spawnSync('/usr/bin/python3', ['-m', 'nbconvert', '--version'], { encoding: 'utf8' }).status === 0;
if (!nbconvertWorks) {
  console.warn('notebook renders skipped: /usr/bin/python3 -m nbconvert does not run (apt-get install jupyter-nbconvert python3-nbclient python3-ipykernel)');
}

interface Cell {
  cell_type: 'code' | 'markdown' | 'raw';
  source: string | string[];
  outputs?: unknown[];
  execution_count?: number | null;
}
interface Notebook {
  cells: Cell[];
  metadata: { kernelspec?: { name?: string } };
}

function readNotebook(file: string): Notebook {
  return JSON.parse(fs.readFileSync(path.join(NOTEBOOKS, file), 'utf8')) as Notebook;
}
const text = (cell: Cell) => (Array.isArray(cell.source) ? cell.source.join('') : cell.source);

describe('committed notebooks', () => {
  it('are the five templates', () => {
    expect(notebookFiles).toEqual([
      '01-describe-survey.ipynb',
      '02-one-dataset-both-ways.ipynb',
      '03-coverage-study.ipynb',
      '04-analyse-survey.ipynb',
      '05-count-survey.ipynb',
    ]);
  });

  it.each(notebookFiles)('%s: outputs cleared, settings first, cautions and invented data last', (file) => {
    const nb = readNotebook(file);
    expect(nb.metadata.kernelspec?.name).toBe('quadrat-ts');
    const code = nb.cells.filter((c) => c.cell_type === 'code');
    for (const c of code) {
      expect(c.outputs, 'outputs are cleared before committing').toEqual([]);
      expect(c.execution_count ?? null).toBeNull();
    }
    expect(nb.cells[0].cell_type).toBe('markdown');
    // The first code cell holds only settings: constant declarations and comments.
    const settings = text(code[0]).split('\n').filter((l) => l.trim() !== '');
    expect(settings[0]).toMatch(/^\/\/ ── Settings/);
    for (const line of settings.slice(1)) expect(line).toMatch(/^const [A-Z_]+(: [^=]+)? = /);
    const last = nb.cells[nb.cells.length - 1];
    expect(last.cell_type).toBe('markdown');
    expect(text(last)).toContain('## Cautions');
    expect(text(last)).toContain('qualified statistician');
    expect(text(last)).toContain('local survey protocols');
    expect(text(last)).toMatch(/\*\*invented\*\*/);
    // tslab resolves files, not folders: the library is imported by its index file.
    const imports = code.map(text).join('\n').match(/from '\.\/kernel-lib[^']*'/g) ?? [];
    expect(imports.length).toBeGreaterThan(0);
    for (const i of imports) expect(i).toBe("from './kernel-lib/index'");
  });
});

describe('notebook helpers', () => {
  const demo = q.readCsvFile(path.join(ROOT, 'data', 'demo-survey.csv'));

  it('columnOverview counts missing and distinct values and gives ranges or levels (counted by hand)', () => {
    const rows = q.columnOverview({ y: [1.5, null, 3, 1.5], site: ['b', 'a', '', 'a'], empty: [null, null, null, null] }, { y: 'response' });
    expect(rows).toEqual([
      { column: 'y', role: 'response', type: 'number', missing: 1, distinct: 2, values: '1.50 to 3' },
      { column: 'site', role: '', type: 'text', missing: 1, distinct: 2, values: 'a, b' },
      { column: 'empty', role: '', type: 'empty', missing: 4, distinct: 0, values: '' },
    ]);
  });

  it('checkSurveyColumns names the missing column, or the row of a non-numeric response', () => {
    expect(() => q.checkSurveyColumns(demo, { response: 'sedge_height', factors: ['site', 'years'] })).toThrow(/column "years" not found; the table has site, grazing/);
    expect(() => q.checkSurveyColumns({ y: [1, 'tall'], g: ['a', 'b'] }, { response: 'y', factors: ['g'] })).toThrow(/column "y" \(the response\) must hold numbers; row 2 holds "tall"/);
    expect(() => q.checkSurveyColumns({ y: [1, 2], g: [null, ''] }, { response: 'y', factors: ['g'] })).toThrow(/column "g" \(a grouping factor\) has no values/);
    expect(() => q.checkSurveyColumns(demo, { response: 'sedge_height', factors: ['site', 'year', 'plot'], covariates: ['grazing'] })).not.toThrow();
  });

  it('columnsToRecords writes nested labels as outer/own and keeps missing labels missing', () => {
    const rows = q.columnsToRecords({ site: ['A', 'B', null], plot: [1, 1, 2], y: new Float64Array([1, 2, 3]) }, { plot: 'site' });
    expect(rows).toEqual([
      { site: 'A', plot: 'A/1', y: 1 },
      { site: 'B', plot: 'B/1', y: 2 },
      { site: null, plot: null, y: 3 },
    ]);
  });

  it('describes the demo survey in the words and numbers of data/README.md', () => {
    // data/README.md: 6 sites x 4 years x 3 plots (numbered within site) x 2 visits = 144 rows,
    // 4 heights missing (2.8%).
    const s = q.describeSurvey(demo, ['site', 'year', 'plot'], 'sedge_height', { plot: 'site' });
    const lines = q.surveySentences(s, 'sedge_height');
    expect(lines[0]).toBe('144 rows; 6 site levels, 4 year levels, 18 plot levels.');
    expect(lines[1]).toBe('4 values of `sedge_height` are missing (2.8%); those rows are left out of fits.');
    expect(lines).toContain('Balanced: every combination of site, year, plot holds 2 rows.');
    expect(lines.some((l) => l.startsWith('`year` (4): fewer than 5 levels'))).toBe(true);
    expect(q.factorRows(s).map((r) => [r.factor, r.levels, r['rows per level'], r.note !== ''])).toEqual([
      ['site', 6, '24', false],
      ['year', 4, '36', true],
      ['plot', 18, '8', false],
    ]);
    expect(q.pairRows(s)).toEqual([
      { factors: 'site × year', relation: 'crossed (every combination observed)', 'combinations observed': '24 of 24', 'never observed': 0 },
      { factors: 'site × plot', relation: 'plot nested in site', 'combinations observed': '', 'never observed': '–' },
      { factors: 'year × plot', relation: 'crossed (every combination observed)', 'combinations observed': '72 of 72', 'never observed': 0 },
    ]);
  });

  it('reports empty combinations of partly crossed factors (counted by hand)', () => {
    const data = { site: ['a', 'a', 'b', 'b'], year: ['1', '2', '1', '1'], y: [1, 2, 3, null] };
    const s = q.describeSurvey(data, ['site', 'year'], 'y');
    expect(q.pairRows(s)[0]).toMatchObject({ relation: 'partly crossed (some combinations never observed)', 'never observed': 1 });
    expect(q.surveySentences(s, 'y')).toContain('`site` and `year`: 1 of 4 combinations were never observed.');
    expect(q.surveySentences(s, 'y')).toContain('Unbalanced: 1 to 2 rows per combination of site, year observed.');
    expect(q.cellCounts(data, 'site', 'year', 'y')).toEqual([
      { site: 'a', year: '1', rows: 1, recorded: 1 },
      { site: 'a', year: '2', rows: 1, recorded: 1 },
      { site: 'b', year: '1', rows: 2, recorded: 1 },
      { site: 'b', year: '2', rows: 0, recorded: 0 },
    ]);
  });

  it('withGroupAs changes one field; modelColumns lists what a model reads', () => {
    const model: q.ModelSpec = JSON.parse(fs.readFileSync(path.join(ROOT, 'data', 'demo-model.json'), 'utf8'));
    const fixed = q.withGroupAs(model, 'year', 'fixed');
    // data/demo-model-year-fixed.json is the same model with year fixed, "the only change" (data/README.md).
    expect(fixed).toEqual(JSON.parse(fs.readFileSync(path.join(ROOT, 'data', 'demo-model-year-fixed.json'), 'utf8')));
    expect(model.groups![2].as).toBe('random');
    expect(() => q.withGroupAs(model, 'region', 'fixed')).toThrow(/no grouping factor "region"; the model's factors are site, plot, year/);
    expect(q.withInterval(model, 'wald').interval).toBe('wald');
    expect(q.modelColumns(model)).toEqual({ response: 'sedge_height', factors: ['site', 'plot', 'year'], covariates: ['soil_moisture', 'grazing'] });
    expect(q.modelNesting(model)).toEqual({ plot: 'site' });
  });

  /** A fit result with only the fields the tables read (the rest is not used). */
  function fakeFit(fixed: [string, number, number, number][], random: [string, string, number][]): FitResult {
    return {
      failure: '',
      fixed: fixed.map(([term, estimate, lower, upper]) => ({ term, estimate, se: 1, lower, upper, df: Infinity, method: 'wald', aliased: false })),
      random: random.map(([factor, term, sd]) => ({ factor, term, sd, variance: sd * sd })),
    } as unknown as FitResult;
  }

  it('fixedEffectRows pairs the fits term by term and marks the intercept of a fit with the factor fixed', () => {
    const randomFit = fakeFit([['intercept', 48, 44, 52], ['rain', 4, 3, 5]], [['year', 'intercept', 3], ['residual', '', 2]]);
    const fixedFit = fakeFit([['intercept', 45, 43, 47], ['year=2022', 2, 0, 4], ['rain', 4.1, 3.25, 5]], [['residual', '', 2.1]]);
    const fits = [{ name: 'year random', fit: randomFit }, { name: 'year fixed', fit: fixedFit }];
    const rows = q.fixedEffectRows(fits, { truth: { intercept: 48, rain: 4 }, fixedFactors: ['year'] });
    expect(rows.map((r) => [r.term, r.fit, r.truth, r.width, r.note])).toEqual([
      ['intercept', 'year random', 48, 8, ''],
      ['intercept', 'year fixed', NaN, 4, 'refers to the reference level of year'],
      ['rain', 'year random', 4, 2, ''],
      ['rain', 'year fixed', 4, 1.75, ''],
    ]);
    expect(q.fixedEffectRows(fits, { fixedFactors: ['year'], includeGroupLevels: true }).map((r) => r.term)).toContain('year=2022');
    expect(q.varianceRows(fits, { year: 3, residual: 2 })).toEqual([
      { component: 'sd(year)', truth: 3, 'year random': 3, 'year fixed': 'fixed' },
      { component: 'sd(residual)', truth: 2, 'year random': 2, 'year fixed': 2.1 },
    ]);
  });

  it('smallSampleMethod prefers Satterthwaite and falls back to Wald', () => {
    expect(q.smallSampleMethod(['wald', 'residual-t'])).toBe('wald');
    expect(q.smallSampleMethod(['wald', 'residual-t', 'satterthwaite', 'kenward-roger'])).toBe('satterthwaite');
  });

  it('withIntervalVariants writes Wald out and adds one copy per variant for another method', () => {
    const design: q.SurveyDesignSpec = JSON.parse(fs.readFileSync(path.join(ROOT, 'data', 'demo-study.json'), 'utf8'));
    const wald = q.withIntervalVariants(design, 'wald');
    expect(wald.variants.map((v) => [v.name, v.model.interval])).toEqual([['year random', 'wald'], ['year fixed', 'wald']]);
    const both = q.withIntervalVariants(design, 'satterthwaite');
    expect(both.variants.map((v) => [v.name, v.model.interval])).toEqual([
      ['year random', 'wald'],
      ['year fixed', 'wald'],
      ['year random, satterthwaite', 'satterthwaite'],
      ['year fixed, satterthwaite', 'satterthwaite'],
    ]);
    expect(both.variants[2].model.groups).toEqual(design.variants[0].model.groups);
    expect(design.variants[0].model.interval).toBeUndefined();
  });

  // 1000 replicates: 0.90 + 2·sqrt(0.9·0.1/1000) = 0.919 is below 0.925 (undercovers), 0.91 + 2·0.00905 =
  // 0.928 is not (computed by hand; judgeCoverage's rule with Bradley's 0.925 floor for 95% intervals,
  // MCSE of a proportion from Morris, White and Crowther 2019, Statistics in Medicine 38:2074, Table 6).
  const scenarios = [
    { index: 0, key: 'factors.year.levels=3', values: { 'factors.year.levels': 3 } },
    { index: 1, key: 'factors.year.levels=8', values: { 'factors.year.levels': 8 } },
  ];
  const coverage = (scenario: string, variant: string, parameter: string, value: number): q.MetricRow => ({
    scenario, variant, parameter, kind: 'fixed', metric: 'coverage', value, mcse: Math.sqrt((value * (1 - value)) / 1000), n: 1000, nominal: 0.95,
  });
  const studyMetrics = [
    coverage('factors.year.levels=3', 'year random', 'rain', 0.9),
    coverage('factors.year.levels=8', 'year random', 'rain', 0.91),
    coverage('factors.year.levels=3', 'year random, satterthwaite', 'rain', 0.93),
    coverage('factors.year.levels=8', 'year random, satterthwaite', 'rain', 0.95),
    coverage('factors.year.levels=3', 'year random', 'intercept', 0.5),
  ];
  const variants = [
    { name: 'year random', model: { response: 'y', interval: 'wald' } },
    { name: 'year random, satterthwaite', model: { response: 'y', interval: 'satterthwaite' } },
  ];

  it('coverageVerdicts counts cells that clearly undercover and names the lowest', () => {
    expect(q.coverageVerdicts(studyMetrics, scenarios, { parameters: ['rain'] })).toEqual([
      { variant: 'year random', 'coverage kept': '1 of 2', 'lowest coverage': 0.9, where: 'rain at year levels = 3', verdict: 'falls short' },
      { variant: 'year random, satterthwaite', 'coverage kept': '2 of 2', 'lowest coverage': 0.93, where: 'rain at year levels = 3', verdict: 'kept everywhere' },
    ]);
    // Without the parameter filter the intercept's 0.5 counts.
    expect(q.coverageVerdicts(studyMetrics, scenarios)[0]['coverage kept']).toBe('1 of 3');
  });

  it('favouredInterval picks the method with the fewest shortfalls', () => {
    const choice = q.favouredInterval(studyMetrics, variants, { parameters: ['rain'] });
    expect(choice.method).toBe('satterthwaite');
    expect(choice.reason).toBe(
      'satterthwaite intervals fell short of nominal coverage in 0 of 2 scenario × parameter cells (lowest 93.0%); wald: 1 of 2, lowest 90.0%.',
    );
    // A method whose variants have no results for the parameters cannot be chosen.
    expect(q.favouredInterval(studyMetrics.slice(0, 2), variants, { parameters: ['rain'] }).method).toBe('wald');
    expect(q.favouredInterval([], variants).reason).toMatch(/no coverage results/);
  });

  it('metricTable puts one scenario and variant per row with value (MCSE) cells', () => {
    const rows = q.metricTable([{ ...studyMetrics[0], value: 0.9432, mcse: 0.0071 }], scenarios, 'rain', ['coverage', 'power']);
    // "0.943 (0.007)": the rounding the smoke notebook checks in tests/integration/render-notebook.test.ts.
    expect(rows).toEqual([{ 'year levels': 3, variant: 'year random', coverage: '0.943 (0.007)', power: '' }]);
  });

  it('studyFolderName is a stable name that changes with the settings, taken from the fingerprint runStudy checks', () => {
    const design = JSON.parse(fs.readFileSync(path.join(ROOT, 'data', 'demo-study.json'), 'utf8'));
    const name = q.studyFolderName(design, 100);
    expect(name).toMatch(/^study-[0-9a-f]{10}$/);
    expect(q.studyFolderName(JSON.parse(JSON.stringify(design)), 100)).toBe(name);
    expect(q.studyFolderName(design, 1000)).not.toBe(name);
    expect(q.studyFolderName({ ...design, seed: 2 }, 100)).not.toBe(name);
    expect(name).toBe(`study-${q.studyFingerprint(design, { replicates: 100 }).slice(0, 10)}`);
  });

  it('studyProgressLines says when everything was on disk, and counts a fresh run', () => {
    const lines: string[] = [];
    let now = 0;
    const resumed = q.studyProgressLines('replicates', { write: (l) => lines.push(l), now: () => now });
    resumed.onProgress({ done: 0, total: 0, resumed: 800, elapsedSeconds: 0, replicatesPerSecond: 0, secondsLeft: NaN });
    resumed.finish();
    expect(lines).toEqual(['replicates: 800 replicates already on disk, resuming', 'replicates: nothing left to run (800 replicates on disk)']);

    lines.length = 0;
    const fresh = q.studyProgressLines('replicates', { write: (l) => lines.push(l), now: () => now, everyFraction: 0.5 });
    for (const done of [0, 50, 100]) {
      now += 1000;
      fresh.onProgress({ done, total: 100, resumed: 0, elapsedSeconds: now / 1000, replicatesPerSecond: 0, secondsLeft: NaN });
    }
    fresh.finish();
    expect(lines[lines.length - 1]).toMatch(/^replicates: done in \d/);
    expect(lines.some((l) => l.startsWith('replicates: 50/100 (50%)'))).toBe(true);
  });
});

describe('tools', () => {
  it('nbconvert is available under CI', () => {
    if (!process.env.CI) return;
    expect(nbconvertWorks, '/usr/bin/python3 -m nbconvert --version must work in CI').toBe(true);
  });
});

describe.skipIf(!nbconvertWorks)('rendering every notebook', () => {
  let tmp = '';
  const outputs = new Map<string, string>();

  beforeAll(() => {
    tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'quadrat-notebooks-'));
  });
  afterAll(() => {
    if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
  });

  /** Text of the page as a reader sees it, without code cells, scripts and styles. */
  function visibleOutputText(html: string): string {
    return html
      .replace(/<div class="\s*highlight[^"]*">\s*<pre>[\s\S]*?<\/pre>/g, '')
      .replace(/<script\b[\s\S]*?<\/script>/gi, '')
      .replace(/<style\b[\s\S]*?<\/style>/gi, '')
      .replace(/<[^>]+>/g, ' ');
  }

  // In file order: 04 reads the interval method that 03 chose, from the shared results folder.
  it.each(notebookFiles)('%s runs without a cell error and shows its charts', (file) => {
    const started = Date.now();
    const r = spawnSync(process.execPath, [SCRIPT, path.join(NOTEBOOKS, file), '--out', tmp], {
      cwd: ROOT,
      encoding: 'utf8',
      // Results and reports of the notebooks go to the temporary folder, not to out/.
      env: { ...process.env, QUADRAT_OUT: path.join(tmp, 'out') },
      timeout: RENDER_TIMEOUT_MS,
    });
    console.log(`${file}: rendered in ${((Date.now() - started) / 1000).toFixed(1)} s`);
    expect(r.stderr, `render-notebook failed for ${file}`).toBe('');
    expect(r.status).toBe(0);
    const html = fs.readFileSync(path.join(tmp, file.replace(/\.ipynb$/, '.html')), 'utf8');
    outputs.set(file, html);

    const images = [...html.matchAll(/<img src="data:image\/svg\+xml;base64,([A-Za-z0-9+/=]+)"/g)];
    expect(images.length).toBeGreaterThan(0);
    for (const [, data] of images) expect(Buffer.from(data, 'base64').toString('utf8')).toMatch(/^<svg\b[\s\S]*<\/svg>$/);
    // No error output: no stderr stream, no error output, no error name in what the reader sees.
    expect(html).not.toContain('data-mime-type="application/vnd.jupyter.stderr"');
    expect(html).not.toContain('data-mime-type="application/vnd.jupyter.error"');
    expect(visibleOutputText(html)).not.toMatch(/\b\w*Error\b/);
    expect(html).not.toMatch(/<script\b[^>]*\bsrc=/i);
  }, RENDER_TIMEOUT_MS);

  it('03 records its choice and 04 uses it in a self-contained report', () => {
    const choiceFile = path.join(tmp, 'out', 'coverage-study', 'choice.json');
    expect(fs.existsSync(choiceFile)).toBe(true);
    const choice = JSON.parse(fs.readFileSync(choiceFile, 'utf8')) as { method: string; folder: string };
    expect((q.INTERVAL_METHODS as readonly string[]).includes(choice.method)).toBe(true);
    expect(fs.existsSync(path.join(choice.folder, 'metrics.json'))).toBe(true);
    expect(outputs.get('04-analyse-survey.ipynb')).toContain(`Interval method: <strong>${choice.method}</strong>, favoured by a coverage study`);

    const report = fs.readFileSync(path.join(tmp, 'out', 'survey-report.html'), 'utf8');
    // the supervisor's report names no folder of this machine and no template notebook
    expect(report).not.toContain(tmp);
    expect(report).not.toMatch(/notebook 0\d/i);
    expect(report).not.toMatch(/<script\b/i);
    expect(report).toContain('<h2>Fixed effects</h2>');
    expect(report.match(/<figure class="chart"><svg\b/g)?.length ?? 0).toBeGreaterThan(3);
    expect(report).toContain('The data are invented');
    expect(report).toContain(q.STANDING_CAUTION);
  });
});
