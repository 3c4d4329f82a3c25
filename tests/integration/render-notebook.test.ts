/**
 * End-to-end: render tests/fixtures/smoke.ipynb with the project's tslab kernel through Debian's
 * nbconvert, then load the HTML in headless Chromium. Needs /usr/bin/python3 with nbconvert,
 * nbclient and jupyter_client, and /usr/bin/chromium; skipped with a message when missing,
 * except under CI, where a missing tool fails the run.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';

const ROOT = path.resolve(__dirname, '..', '..');
const SCRIPT = path.join(ROOT, 'scripts', 'render-notebook.js');
const SMOKE = path.join(ROOT, 'tests', 'fixtures', 'smoke.ipynb');
const ARTIFACTS = path.join(ROOT, 'tests', 'artifacts');
const CHROMIUM = '/usr/bin/chromium';
const RENDER_TIMEOUT_MS = 300_000;

const nbconvertWorks = spawnSync('/usr/bin/python3', ['-m', 'nbconvert', '--version'], { encoding: 'utf8' }).status === 0;
const chromiumWorks = fs.existsSync(CHROMIUM);
if (!nbconvertWorks) console.warn('render tests skipped: /usr/bin/python3 -m nbconvert does not run (apt-get install jupyter-nbconvert python3-nbclient python3-ipykernel)');
if (!chromiumWorks) console.warn(`browser checks skipped: ${CHROMIUM} not found (apt-get install chromium)`);

function render(notebook: string, outDir: string, env: NodeJS.ProcessEnv = {}) {
  return spawnSync(process.execPath, [SCRIPT, notebook, '--out', outDir], {
    cwd: ROOT,
    encoding: 'utf8',
    env: { ...process.env, ...env },
    timeout: RENDER_TIMEOUT_MS,
  });
}

function chromium(args: string[]) {
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'quadrat-chromium-'));
  try {
    return spawnSync(
      CHROMIUM,
      [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
        '--no-first-run',
        `--user-data-dir=${profile}`,
        '--window-size=1200,1600',
        // Lets vega-embed finish drawing before the DOM is taken.
        '--virtual-time-budget=10000',
        ...args,
      ],
      { encoding: 'utf8', timeout: 120_000, maxBuffer: 64 * 1024 * 1024 },
    );
  } finally {
    fs.rmSync(profile, { recursive: true, force: true });
  }
}

/** A one-cell notebook for the quadrat-ts kernel (nbformat 4.5). */
function writeNotebook(dir: string, name: string, source: string): string {
  const file = path.join(dir, name);
  const nb = {
    cells: [{ id: 'only', cell_type: 'code', execution_count: null, metadata: {}, outputs: [], source }],
    metadata: { kernelspec: { name: 'quadrat-ts', display_name: 'TypeScript (Quadrat)', language: 'typescript' } },
    nbformat: 4,
    nbformat_minor: 5,
  };
  fs.writeFileSync(file, JSON.stringify(nb));
  return file;
}

/** Number of drawn marks (bars, points: <path> items with role graphics-symbol; axes are <g>). */
function markCount(svg: string): number {
  return (svg.match(/<path\b[^>]*>/g) ?? []).filter((tag) => tag.includes('role="graphics-symbol"')).length;
}

describe('tools', () => {
  it('nbconvert and Chromium are available under CI', () => {
    if (!process.env.CI) return;
    expect(nbconvertWorks, '/usr/bin/python3 -m nbconvert --version must work in CI').toBe(true);
    expect(chromiumWorks, `${CHROMIUM} must exist in CI`).toBe(true);
  });

  it('says in one line how to install Jupyter when nbconvert cannot run', () => {
    const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'quadrat-render-'));
    try {
      const r = render(SMOKE, tmp, { QUADRAT_PYTHON: path.join(tmp, 'no-such-python') });
      expect(r.status).toBe(1);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toContain('apt-get install jupyter-nbconvert python3-nbclient python3-ipykernel');
    } finally {
      fs.rmSync(tmp, { recursive: true, force: true });
    }
  });
});

describe.skipIf(!nbconvertWorks)('render-notebook with the quadrat-ts kernel', () => {
  let tmp = '';
  let html = '';
  let result: ReturnType<typeof render>;

  beforeAll(() => {
    tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'quadrat-render-'));
    result = render(SMOKE, tmp);
    const file = path.join(tmp, 'smoke.html');
    if (fs.existsSync(file)) html = fs.readFileSync(file, 'utf8');
  }, RENDER_TIMEOUT_MS);

  afterAll(() => {
    if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
  });

  it('renders the smoke notebook to one self-contained HTML file', () => {
    expect(result.stderr).toBe('');
    expect(result.status).toBe(0);
    expect(result.stdout).toMatch(/^Wrote .*smoke\.html \(\d+ kB\)\n$/);
    expect(html).not.toMatch(/<script\b[^>]*\bsrc=/i);
    expect(html).not.toMatch(/<link\b[^>]*\bhref=/i);
    // Execution counts are carried over from tslab's replies.
    expect(html).toContain('In&nbsp;[3]:');
  });

  it('keeps a static picture of each chart and the interactive view once with its scripts', () => {
    // Cell 3 shows two charts: the first interactive (text/html output), the second static
    // (text/markdown output with an <img>); nbconvert prefers text/html over text/markdown.
    const interactive = html.match(/<div id="quadrat-chart-[\w-]+" class="quadrat-chart"><img src="data:image\/svg\+xml;base64,/g) ?? [];
    expect(interactive).toHaveLength(1);
    const markdownImages = [...html.matchAll(/data-mime-type="text\/markdown">\s*<p><img src="data:image\/svg\+xml;base64,([A-Za-z0-9+/=]+)"/g)];
    expect(markdownImages).toHaveLength(1);
    const svg = Buffer.from(markdownImages[0][1], 'base64').toString('utf8');
    expect(markCount(svg)).toBe(3); // three sites -> three points
    expect(html.match(/\.vegaEmbed=/g)).toHaveLength(1);
    expect(html).toContain('0.943 (0.007)');
    expect(html).toContain('power &lt;site&gt;');
  });

  it.skipIf(!chromiumWorks)('draws every chart in Chromium with no error output, and saves a screenshot', () => {
    const file = path.join(tmp, 'smoke.html');
    const dom = chromium(['--dump-dom', `file://${file}`]);
    expect(dom.status).toBe(0);
    const page = dom.stdout;
    expect(page).toContain('</html>');

    // Interactive chart: vega-embed replaced the picture by an SVG view with three bars.
    const start = page.search(/<div id="quadrat-chart-[\w-]+" class="quadrat-chart/);
    expect(start).toBeGreaterThan(0);
    const nextOutput = page.indexOf('jp-OutputArea-child', start);
    const chart = page.slice(start, nextOutput > 0 ? nextOutput : undefined);
    expect(chart).toMatch(/<svg[^>]*class="marks"/);
    expect(chart).not.toContain('<img');
    expect(markCount(chart)).toBe(3);
    // Static chart: still the <img> with its SVG data URI.
    expect(page).toMatch(/data-mime-type="text\/markdown">\s*<p><img src="data:image\/svg\+xml;base64,/);

    // No error output: no stderr stream, and no error name in the visible text of the page.
    expect(page).not.toContain('data-mime-type="application/vnd.jupyter.stderr"');
    const text = page
      .replace(/<script\b[\s\S]*?<\/script>/gi, '')
      .replace(/<style\b[\s\S]*?<\/style>/gi, '')
      .replace(/<[^>]+>/g, ' ');
    expect(text).not.toMatch(/\w*Error\b/);
    expect(text).toContain('Invented metrics');

    fs.mkdirSync(ARTIFACTS, { recursive: true });
    const png = path.join(ARTIFACTS, 'smoke.png');
    fs.rmSync(png, { force: true });
    const shot = chromium([`--screenshot=${png}`, `file://${file}`]);
    expect(shot.status).toBe(0);
    const bytes = fs.readFileSync(png);
    // PNG signature (PNG specification, section 5.2) and a page that is not blank: a white
    // 1200x1600 PNG compresses to a few kB (common practice, no source).
    expect(bytes.subarray(0, 8).toString('hex')).toBe('89504e470d0a1a0a');
    expect(bytes.length).toBeGreaterThan(20_000);
  }, 240_000);

  it('fails with the failing cell and its error name and message', () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'quadrat-render-'));
    try {
      const runtime = writeNotebook(dir, 'runtime.ipynb', "const sites = 3;\nthrow new RangeError(`expected 4 sites, got ${sites}`);");
      const r = render(runtime, dir);
      expect(r.status).toBe(1);
      expect(r.stderr).toContain('render-notebook: cell 1 failed: RangeError: expected 4 sites, got 3');
      expect(r.stderr).toContain('cell starts: const sites = 3;');
      expect(r.stderr).not.toContain('Traceback');
      expect(fs.existsSync(path.join(dir, 'runtime.html'))).toBe(false);

      const typed = writeNotebook(dir, 'typed.ipynb', "const n: number = 'twelve';");
      const t = render(typed, dir);
      expect(t.status).toBe(1);
      expect(t.stderr).toMatch(/cell 1 failed: TypeScript error: line 1, column 7: Type 'string' is not assignable to type 'number'/);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  }, RENDER_TIMEOUT_MS);
});

describe('parsing tslab error text', () => {
  // Samples captured from tslab 1.0.22 cell outputs on this project's kernel.
  const { parseTslabError, findCellFailure, stripExternalResources } = require('../../scripts/render-notebook') as {
    parseTslabError: (text: string) => { name: string; message: string };
    findCellFailure: (stderr: string) => { cellNumber: number | null; source: string; name: string; message: string } | null;
    stripExternalResources: (html: string) => { html: string; removed: string[] };
  };

  it('reads Node-printed errors after a console.error line', () => {
    const text =
      'a warning first\nevalmachine.<anonymous>:2\nthrow new RangeError(\'boom: bad\');\n^\n\nRangeError: boom: bad\n    at evalmachine.<anonymous>:2:7\n';
    expect(parseTslabError(text)).toEqual({ name: 'RangeError', message: 'boom: bad' });
  });

  it('reads TypeScript diagnostics and thrown non-errors', () => {
    expect(parseTslabError("1:1 - Cannot find name 'f'.\n2:3 - Expected 1 argument.\n")).toEqual({
      name: 'TypeScript error',
      message: "line 1, column 1: Cannot find name 'f'.; line 2, column 3: Expected 1 argument.",
    });
    expect(parseTslabError('a string\n')).toEqual({ name: 'Thrown value', message: 'a string' });
  });

  it('falls back to nbclient\'s CellExecutionError text when the hook line is missing', () => {
    // Layout of nbclient 0.7 exceptions.exec_err_msg: source between dashed lines, then "ename: evalue".
    const stderr =
      'Traceback (most recent call last):\n  ...\nnbclient.exceptions.CellExecutionError: An error occurred while executing the following cell:\n' +
      '------------------\nfit(model)\n------------------\n\n\n<Error>: \n';
    expect(findCellFailure(stderr)).toEqual({ cellNumber: null, source: 'fit(model)', name: 'Error', message: '(no message from the kernel)' });
    const hook = 'noise\nQUADRAT_CELL_ERROR ' + JSON.stringify({ cellIndex: 2, source: 'x', ename: '', evalue: '', outputs: [{ kind: 'stderr', text: 'TypeError: y\n    at z\n' }] });
    expect(findCellFailure(hook)).toEqual({ cellNumber: 3, source: 'x', name: 'TypeError', message: 'y' });
  });

  it('removes script and stylesheet references but keeps inline scripts and data URIs', () => {
    const page =
      '<head><script src="file:///usr/share/javascript/requirejs/require.min.js"></script>' +
      '<link rel="stylesheet" href="https://example.org/a.css"><script>var a = 1;</script>' +
      '<script src="data:text/javascript,1"></script></head>';
    const r = stripExternalResources(page);
    expect(r.removed).toEqual(['file:///usr/share/javascript/requirejs/require.min.js', 'https://example.org/a.css']);
    expect(r.html).toBe('<head><script>var a = 1;</script><script src="data:text/javascript,1"></script></head>');
  });
});
