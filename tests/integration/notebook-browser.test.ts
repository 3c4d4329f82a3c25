/**
 * The live loop a user works in: Debian's classic Jupyter Notebook server (`jupyter-notebook`) on
 * the loopback address with the project's kernel, driven by headless Chromium through
 * playwright-core. It opens a copy of notebook 02, runs all cells from the Cell menu, checks that
 * every cell finished without error output and that every chart is drawn live (a vega-embed SVG),
 * edits the seed in the settings cell by keyboard, runs all cells again and checks that the charts
 * changed, then stops the server and checks that the kernel process ended with it.
 *
 * Everything Jupyter writes goes to a temporary folder (config, data with the kernelspec, runtime,
 * HOME), the notebook is a copy, results go to QUADRAT_OUT in that folder. The server runs in its
 * own process group and the kernel in its own session (jupyter_client starts it so); both are
 * stopped in `finally`, also when a check fails. A screenshot is kept in tests/artifacts/.
 * Skipped with a message when jupyter-notebook or Chromium is missing, except under CI.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { type ChildProcess, spawn, spawnSync } from 'node:child_process';
import * as fs from 'node:fs';
import * as net from 'node:net';
import * as os from 'node:os';
import * as path from 'node:path';
import { randomBytes } from 'node:crypto';
import { chromium, type Browser, type Page } from 'playwright-core';

const ROOT = path.resolve(__dirname, '..', '..');
const NOTEBOOK = '02-one-dataset-both-ways.ipynb';
const UNTRUSTED = 'received-copy.ipynb';
const ARTIFACTS = path.join(ROOT, 'tests', 'artifacts');
const CHROMIUM = '/usr/bin/chromium';
const SERVER = 'jupyter-notebook';
const TEST_TIMEOUT_MS = 420_000;
/** One run of all cells (the kernel's first cell compiles the library: about 10 s on a quiet machine). */
const RUN_ALL_TIMEOUT_MS = 180_000;

const { registerKernel } = require('../../scripts/register-kernel.js') as {
  registerKernel: (jupyterPath: string) => { kernelName: string };
};

const serverWorks = spawnSync(SERVER, ['--version'], { encoding: 'utf8' }).status === 0;
const chromiumWorks = fs.existsSync(CHROMIUM);
if (!serverWorks) console.warn(`browser notebook test skipped: ${SERVER} does not run (apt-get install jupyter-notebook)`);
if (!chromiumWorks) console.warn(`browser notebook test skipped: ${CHROMIUM} not found (apt-get install chromium)`);

/** A free TCP port on the loopback address (asked from the system, then released). */
function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = net.createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const port = (probe.address() as net.AddressInfo).port;
      probe.close(() => resolve(port));
    });
  });
}

function sleep(ms: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

/** Whether a process is alive (a zombie, ended but not yet collected, counts as ended). */
function alive(pid: number): boolean {
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
    return stat.slice(stat.lastIndexOf(')') + 2)[0] !== 'Z';
  } catch {
    return false;
  }
}

/** Processes whose command line mentions `marker` (the kernels name their connection file in our runtime folder). */
function processesMentioning(marker: string): number[] {
  const pids: number[] = [];
  for (const entry of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(entry) || Number(entry) === process.pid) continue;
    try {
      if (fs.readFileSync(`/proc/${entry}/cmdline`, 'utf8').includes(marker) && alive(Number(entry))) pids.push(Number(entry));
    } catch {
      // ended meanwhile
    }
  }
  return pids;
}

async function waitUntil(what: string, ok: () => boolean | Promise<boolean>, timeoutMs: number): Promise<void> {
  const end = Date.now() + timeoutMs;
  while (!(await ok())) {
    if (Date.now() > end) throw new Error(`timed out after ${timeoutMs / 1000} s waiting for ${what}`);
    await sleep(200);
  }
}

/** Stop a process and its group: TERM, then KILL after `graceMs`. */
async function stopGroup(pid: number, graceMs: number): Promise<void> {
  const signal = (sig: NodeJS.Signals) => {
    for (const target of [-pid, pid]) {
      try {
        process.kill(target, sig);
      } catch {
        // already gone, or not a group leader
      }
    }
  };
  signal('SIGTERM');
  const end = Date.now() + graceMs;
  while (alive(pid) && Date.now() < end) await sleep(100);
  signal('SIGKILL');
}

/** What the test started, for the clean-up (also run after a timeout and at exit). */
const started: { serverPid?: number; runtimeDir?: string; browser?: Browser; tmp?: string } = {};

/** Stop the browser, the server's process group and any kernel left in our runtime folder; remove the temporary folder. */
async function cleanUp(): Promise<void> {
  const { browser, serverPid, runtimeDir, tmp } = started;
  for (const key of Object.keys(started) as (keyof typeof started)[]) delete started[key];
  if (browser) await browser.close().catch(() => undefined);
  if (serverPid !== undefined) await stopGroup(serverPid, 5_000);
  // The kernel runs in a session of its own: stop what is left of it too.
  if (runtimeDir !== undefined) for (const pid of processesMentioning(runtimeDir)) await stopGroup(pid, 2_000);
  if (tmp !== undefined) fs.rmSync(tmp, { recursive: true, force: true });
}

/** Last resort if the worker exits before the clean-up ran: kill synchronously. */
process.once('exit', () => {
  const kill = (pid: number) => {
    for (const target of [-pid, pid]) {
      try {
        process.kill(target, 'SIGKILL');
      } catch {
        // gone
      }
    }
  };
  if (started.serverPid !== undefined) kill(started.serverPid);
  if (started.runtimeDir !== undefined) processesMentioning(started.runtimeDir).forEach(kill);
});

/** State of the notebook as the page shows it: prompt numbers of code cells, kernel indicator, outputs. */
interface PageState {
  prompts: (number | null)[];
  idle: boolean;
  errorOutputs: number;
  /** Per code cell: the SVG of each live chart, or '' for a chart box without one. */
  charts: string[][];
}

function readState(page: Page): Promise<PageState> {
  return page.evaluate(() => {
    const doc = (globalThis as any).document;
    const cells = Array.from(doc.querySelectorAll('#notebook-container .cell.code_cell')) as any[];
    return {
      prompts: cells.map((c) => {
        const m = /\[(\d+)\]/.exec(c.querySelector('.input_prompt')?.textContent ?? '');
        return m ? Number(m[1]) : null;
      }),
      idle: doc.querySelector('#kernel_indicator_icon')?.classList.contains('kernel_idle_icon') ?? false,
      // tslab writes errors to stderr; the classic interface marks JavaScript output errors with .js-error
      errorOutputs: doc.querySelectorAll('.output_stderr, .output_error, .js-error').length,
      charts: cells.map((c) =>
        (Array.from(c.querySelectorAll('.quadrat-chart')) as any[]).map((box) => box.querySelector('svg.marks')?.outerHTML ?? ''),
      ),
    };
  });
}

/** Run all cells from the Cell menu and wait until every code cell has a new number and the kernel is idle. */
async function runAll(page: Page, after: number): Promise<PageState> {
  await page.click('#celllink');
  await page.click('#run_all_cells > a');
  let state = await readState(page);
  await waitUntil(
    'every code cell to finish with the kernel idle',
    async () => {
      state = await readState(page);
      return state.idle && state.prompts.every((n) => n !== null && n > after);
    },
    RUN_ALL_TIMEOUT_MS,
  );
  // vega-embed draws asynchronously after the output arrives
  await waitUntil(
    'every live chart to be drawn',
    async () => {
      state = await readState(page);
      return state.charts.every((boxes) => boxes.every((svg) => svg !== ''));
    },
    20_000,
  );
  return state;
}

describe('tools', () => {
  it('jupyter-notebook and Chromium are available under CI', () => {
    if (!process.env.CI) return;
    expect(serverWorks, `${SERVER} --version must work in CI`).toBe(true);
    expect(chromiumWorks, `${CHROMIUM} must exist in CI`).toBe(true);
  });
});

describe.skipIf(!serverWorks || !chromiumWorks)('a template notebook in the classic Notebook interface', () => {
  afterAll(cleanUp, 30_000);

  it(
    'runs every cell, draws every chart live, redraws them after the seed is edited, and ends the kernel with the server',
    async () => {
      const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'quadrat-browser-'));
      started.tmp = tmp;
      const dirs = Object.fromEntries(
        ['config', 'data', 'runtime', 'home', 'notebooks', 'out'].map((d) => [d, path.join(tmp, d)]),
      ) as Record<string, string>;
      for (const d of Object.values(dirs)) fs.mkdirSync(d);
      fs.copyFileSync(path.join(ROOT, 'notebooks', NOTEBOOK), path.join(dirs.notebooks, NOTEBOOK));
      const notebook = JSON.parse(fs.readFileSync(path.join(dirs.notebooks, NOTEBOOK), 'utf8')) as {
        cells: { cell_type: string; source: string | string[] }[];
      };
      const codeSources = notebook.cells.filter((c) => c.cell_type === 'code').map((c) => [c.source].flat().join(''));
      const seedMatch = /const SEED = (\d+);/.exec(codeSources[0]);
      expect(seedMatch, `the settings cell (first code cell) of ${NOTEBOOK} sets "const SEED = <number>;"`).not.toBeNull();
      const chartCells = codeSources.map((s, i) => (s.includes('showChart') ? i : -1)).filter((i) => i >= 0);
      expect(chartCells.length).toBeGreaterThan(0);

      const { kernelName } = registerKernel(dirs.data);
      expect(kernelName).toBe('quadrat-ts');
      const port = await freePort();
      const token = randomBytes(16).toString('hex');
      const env: NodeJS.ProcessEnv = {
        ...process.env,
        HOME: dirs.home,
        JUPYTER_CONFIG_DIR: dirs.config,
        JUPYTER_DATA_DIR: dirs.data,
        JUPYTER_PATH: dirs.data,
        JUPYTER_RUNTIME_DIR: dirs.runtime,
        IPYTHONDIR: path.join(dirs.home, '.ipython'),
        QUADRAT_OUT: dirs.out,
      };
      delete env.QUADRAT_HTML_RENDER;

      let server: ChildProcess | null = null;
      let serverLog = '';
      let browser: Browser | null = null;
      const startedAt = Date.now();
      started.runtimeDir = dirs.runtime;
      try {
        server = spawn(
          SERVER,
          [
            '--no-browser',
            '--ip=127.0.0.1',
            `--port=${port}`,
            '--port-retries=0',
            `--notebook-dir=${dirs.notebooks}`,
            `--NotebookApp.token=${token}`,
            // CI containers run as root, which the server refuses unless told
            ...(process.getuid?.() === 0 ? ['--allow-root'] : []),
          ],
          { cwd: dirs.notebooks, env, detached: true, stdio: ['ignore', 'pipe', 'pipe'] },
        );
        started.serverPid = server.pid;
        server.stdout!.on('data', (d) => (serverLog += d));
        server.stderr!.on('data', (d) => (serverLog += d));
        const base = `http://127.0.0.1:${port}`;
        await waitUntil(
          'the Notebook server to answer',
          async () => {
            if (server!.exitCode !== null) throw new Error(`${SERVER} ended early (exit ${server!.exitCode}):\n${serverLog}`);
            try {
              return (await fetch(`${base}/api/status?token=${token}`)).ok;
            } catch {
              return false;
            }
          },
          60_000,
        );

        browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: ['--no-sandbox', '--disable-gpu'] });
        started.browser = browser;
        const page = await browser.newPage({ viewport: { width: 1280, height: 1000 } });
        const pageErrors: string[] = [];
        page.on('pageerror', (err) => pageErrors.push(String(err)));
        await page.goto(`${base}/notebooks/${NOTEBOOK}?token=${token}`);
        await page.waitForSelector('#kernel_indicator_icon.kernel_idle_icon', { timeout: 60_000 });
        expect(await page.textContent('.kernel_indicator_name')).toContain('TypeScript (Quadrat)');

        const lap = (what: string) => console.log(`${what}: ${((Date.now() - startedAt) / 1000).toFixed(1)} s`);
        lap('kernel ready');
        const first = await runAll(page, 0);
        lap('first run');
        expect(first.prompts).toHaveLength(codeSources.length);
        expect(first.errorOutputs, 'no error output after the first run').toBe(0);
        for (const i of chartCells) {
          // Live charts: vega-embed replaced the static picture by an SVG view in each chart output.
          expect(first.charts[i].length, `code cell ${i + 1} shows its charts`).toBeGreaterThan(0);
          for (const svg of first.charts[i]) expect(svg).toMatch(/role="graphics-symbol"|aria-roledescription/);
        }
        const livePictures = await page.locator('.quadrat-chart > img').count();
        expect(livePictures, 'no static picture is left in place of a live chart').toBe(0);
        // The vega libraries came with the first chart of the session only.
        const withLibraries = await page.evaluate(
          () => ((globalThis as any).Jupyter.notebook.get_cells() as any[])
            .flatMap((c) => c.output_area?.outputs ?? [])
            .filter((o: any) => String(o.data?.['text/html'] ?? '').includes('.vegaEmbed=')).length,
        );
        expect(withLibraries).toBe(1);

        // Edit the seed in the settings cell as a user would: click into the line, select it, type it with another number.
        const seed = Number(seedMatch![1]);
        const settings = page.locator('#notebook-container .cell.code_cell').first();
        const seedLine = settings.locator('.CodeMirror-line', { hasText: 'const SEED' });
        await seedLine.locator('.cm-number').first().click();
        await settings.locator('.CodeMirror-focused').waitFor({ timeout: 10_000 });
        // (select the line from its start and type it anew: a double click is not reliable on a busy machine)
        await page.keyboard.press('Home');
        await page.keyboard.press('Shift+End');
        await page.keyboard.type(`const SEED = ${seed + 1};`);
        expect(await seedLine.textContent()).toContain(`const SEED = ${seed + 1};`);

        const before = Math.max(...first.prompts.map((n) => n ?? 0));
        const second = await runAll(page, before);
        lap('second run');
        expect(second.errorOutputs, 'no error output after the edit').toBe(0);
        for (const i of chartCells) {
          // (the number of charts may change: a fit on other data can end singular, for example)
          expect(second.charts[i].length, `code cell ${i + 1} shows its charts again`).toBeGreaterThan(0);
          expect(second.charts[i].join('\n'), `the charts of code cell ${i + 1} changed with the seed`).not.toBe(first.charts[i].join('\n'));
        }
        expect(pageErrors).toEqual([]);

        fs.mkdirSync(ARTIFACTS, { recursive: true });
        // The notebook scrolls inside #site; let the page grow so that one screenshot holds it all.
        await page.addStyleTag({ content: '#site { height: auto !important; overflow: visible !important; }' });
        await page.screenshot({ path: path.join(ARTIFACTS, 'notebook-browser.png'), fullPage: true });

        // The same outputs in a notebook the interface does not trust (saved without its signature,
        // as a notebook received from someone else): no script runs, each chart shows its picture.
        await page.evaluate(() => (globalThis as any).Jupyter.notebook.save_notebook());
        const api = (name: string) => `${base}/api/contents/${name}?token=${token}`;
        const saved = (await (await fetch(api(NOTEBOOK))).json()) as {
          content: { cells: { metadata: Record<string, unknown> }[]; metadata: Record<string, unknown> };
        };
        for (const cell of saved.content.cells) cell.metadata.trusted = false;
        // Signatures are digests of the content: an identical copy would count as signed.
        saved.content.metadata.title = 'A copy received by mail';
        const put = await fetch(api(UNTRUSTED), {
          method: 'PUT',
          headers: { 'Content-Type': 'application/json' },
          body: JSON.stringify({ type: 'notebook', format: 'json', content: saved.content }),
        });
        expect(put.ok).toBe(true);
        const other = await browser.newPage({ viewport: { width: 1280, height: 1000 } });
        other.on('pageerror', (err) => pageErrors.push(String(err)));
        await other.goto(`${base}/notebooks/${UNTRUSTED}?token=${token}`);
        // (the outputs are there once the notebook has loaded; its kernel may still be starting)
        await other.waitForFunction(
          (n) => (globalThis as any).document.querySelectorAll('.quadrat-chart').length >= n,
          second.charts.flat().length,
          { timeout: 60_000 },
        );
        expect(await other.evaluate(() => (globalThis as any).Jupyter.notebook.trusted)).toBe(false);
        const untrusted = await readState(other);
        const pictures = await other.locator('.quadrat-chart > img[src^="data:image/svg+xml;base64,"]').count();
        expect(pictures, 'each chart shows its picture in the untrusted copy').toBe(second.charts.flat().length);
        expect(untrusted.charts.flat().every((svg) => svg === ''), 'no live chart in the untrusted copy').toBe(true);
        await other.locator('.quadrat-chart').first().screenshot({ path: path.join(ARTIFACTS, 'notebook-browser-untrusted-chart.png') });
        await other.close();
        lap('untrusted copy');
        expect(pageErrors).toEqual([]);

        // Stop the server as a user does (SIGTERM to its process group); its kernel must end with it.
        await waitUntil('a kernel for each opened notebook', () => processesMentioning(dirs.runtime).length >= 2, 60_000);
        const kernels = processesMentioning(dirs.runtime);
        expect(kernels.length, 'one kernel process per opened notebook').toBe(2);
        await browser.close();
        started.browser = undefined;
        const serverPid = server.pid!;
        process.kill(-serverPid, 'SIGTERM');
        await waitUntil('the server to stop', () => server!.exitCode !== null || server!.signalCode !== null, 30_000);
        await waitUntil('the kernel to end', () => kernels.every((pid) => !alive(pid)), 15_000);
        expect(processesMentioning(dirs.runtime)).toEqual([]);
        console.log(`notebook in the browser: ${((Date.now() - startedAt) / 1000).toFixed(1)} s`);
      } finally {
        await cleanUp();
      }
    },
    TEST_TIMEOUT_MS,
  );
});
