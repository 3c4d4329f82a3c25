#!/usr/bin/env node
'use strict';
/**
 * Run a notebook with the project's TypeScript kernel and write a self-contained HTML file.
 *
 *   node scripts/render-notebook.js notebooks/<name>.ipynb [--out <folder>] [--verbose]
 *
 * Steps: register the kernel (scripts/register-kernel.js), run Debian's nbconvert
 * (`/usr/bin/python3 -m nbconvert --to html --execute`, kernel quadrat-ts, 600 s per cell unless
 * --cell-timeout or QUADRAT_CELL_TIMEOUT says otherwise) with
 * JUPYTER_PATH pointing at notebooks/.kernel, then strip the two <script src> tags nbconvert
 * adds (require.js and MathJax from /usr/share/javascript), which a reader elsewhere would not
 * have. LaTeX in Markdown cells therefore stays as source text. QUADRAT_HTML_RENDER=1 is set so
 * that charts shown with { interactive: true } carry their interactive view.
 *
 * A failing cell fails the command (exit 1) with the cell's error name and message. tslab
 * sends errors as stderr text with an empty ename/evalue, so nbconvert's own CellExecutionError
 * says only "<Error>:"; a small nbclient hook (on_cell_error, loaded with --config) prints the
 * failing cell's outputs as one JSON line, which is parsed here. Another hook copies the
 * execution count from tslab's reply, so the HTML shows "In [1]:" rather than "In [ ]:".
 *
 * A render always ends: hooks report each cell's start and end, a cell past its timeout gets
 * the process group stopped with a message naming the notebook and the cell, and the kernel is
 * stopped outright after the last cell (shutdown_kernel "immediate"); if nbconvert has still not
 * ended --shutdown-wait seconds (default 60) after the last cell, it is stopped, saying so.
 *
 * Environment: QUADRAT_PYTHON overrides /usr/bin/python3 (the Python that has nbconvert).
 */
const path = require('node:path');
const fs = require('node:fs');
const os = require('node:os');
const { spawn, spawnSync } = require('node:child_process');
const { registerKernel } = require('./register-kernel');

const INSTALL_HINT = 'apt-get install jupyter-nbconvert python3-nbclient python3-ipykernel';
const HOOK_MARKER = 'QUADRAT_CELL_ERROR ';
const CELL_TIMEOUT_S = 600;
/** After the last cell, how long the kernel may take to shut down before it is stopped. */
const SHUTDOWN_WAIT_S = 60;
const PROGRESS_MARKER = 'QUADRAT_PROGRESS ';

const HOOK_CONFIG = `
import json, sys

def _quadrat_report_cell_error(cell, cell_index, execute_reply, **kwargs):
    content = execute_reply.get('content', {}) if isinstance(execute_reply, dict) else {}
    outputs = []
    for o in cell.get('outputs', []):
        kind = o.get('output_type')
        if kind == 'error':
            outputs.append({'kind': 'error', 'ename': o.get('ename', ''), 'evalue': o.get('evalue', ''),
                            'traceback': o.get('traceback', [])})
        elif kind == 'stream' and o.get('name') == 'stderr':
            outputs.append({'kind': 'stderr', 'text': o.get('text', '')})
    record = {'cellIndex': cell_index, 'source': cell.get('source', ''), 'ename': content.get('ename', ''),
              'evalue': content.get('evalue', ''), 'outputs': outputs}
    sys.stderr.write(${JSON.stringify(HOOK_MARKER)} + json.dumps(record) + '\\n')
    sys.stderr.flush()

def _quadrat_progress(event, index=-1):
    sys.stderr.write(${JSON.stringify(PROGRESS_MARKER)} + json.dumps({'event': event, 'index': index}) + '\\n')
    sys.stderr.flush()

def _quadrat_cell_start(cell, cell_index, **kwargs):
    _quadrat_progress('start', cell_index)

def _quadrat_keep_execution_count(cell, cell_index, execute_reply, **kwargs):
    # tslab sends no execute_input message, from which nbclient takes the count; the reply has it.
    content = execute_reply.get('content', {}) if isinstance(execute_reply, dict) else {}
    if cell.get('execution_count') is None and content.get('execution_count') is not None:
        cell['execution_count'] = content['execution_count']
    _quadrat_progress('done', cell_index)

def _quadrat_notebook_complete(**kwargs):
    _quadrat_progress('complete')

c.ExecutePreprocessor.on_cell_error = _quadrat_report_cell_error
c.ExecutePreprocessor.on_cell_start = _quadrat_cell_start
c.ExecutePreprocessor.on_cell_executed = _quadrat_keep_execution_count
c.ExecutePreprocessor.on_notebook_complete = _quadrat_notebook_complete
# stop the kernel process at the end instead of asking it to shut down and waiting for an answer
c.ExecutePreprocessor.shutdown_kernel = 'immediate'
`;

function usage() {
  return 'usage: node scripts/render-notebook.js <notebook.ipynb> [--out <folder>] [--cell-timeout <s>] [--shutdown-wait <s>] [--verbose]';
}

function parseArgs(argv) {
  const args = {
    notebook: null, out: 'out', verbose: false,
    cellTimeout: Number(process.env.QUADRAT_CELL_TIMEOUT || CELL_TIMEOUT_S), shutdownWait: SHUTDOWN_WAIT_S,
  };
  const seconds = (name, text) => {
    const v = Number(text);
    if (!(v > 0 && Number.isFinite(v))) throw new Error(`${name}: expected a number of seconds > 0, got "${text}"`);
    return v;
  };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--out') {
      if (i + 1 >= argv.length) throw new Error('--out needs a folder');
      args.out = argv[++i];
    } else if (a.startsWith('--out=')) args.out = a.slice(6);
    else if (a === '--verbose') args.verbose = true;
    else if (a === '--cell-timeout') args.cellTimeout = seconds(a, argv[++i]);
    else if (a === '--shutdown-wait') args.shutdownWait = seconds(a, argv[++i]);
    else if (a === '--help' || a === '-h') args.help = true;
    else if (a.startsWith('-')) throw new Error(`unknown option ${a}`);
    else if (args.notebook === null) args.notebook = a;
    else throw new Error(`one notebook at a time (got ${args.notebook} and ${a})`);
  }
  if (!args.help && args.notebook === null) throw new Error('no notebook given');
  return args;
}

function pythonPath() {
  return process.env.QUADRAT_PYTHON || '/usr/bin/python3';
}

/** Whether nbconvert can be run; the reason when not. */
function checkNbconvert(python) {
  const r = spawnSync(python, ['-m', 'nbconvert', '--version'], { encoding: 'utf8' });
  if (r.error) return { ok: false, reason: `${python} not found` };
  if (r.status !== 0) return { ok: false, reason: `${python} -m nbconvert failed` };
  return { ok: true, version: r.stdout.trim() };
}

/** "1:7 - message" lines are tslab's TypeScript diagnostics (line:column within the cell). */
const COMPILE_LINE = /^(\d+):(\d+) - (.*)$/;
/** Node's first line of a printed error: "Name: message" or "Name [CODE]: message". */
const ERROR_HEADER = /^([A-Za-z_$][\w$.]*)(?: \[([^\]]+)\])?(?:: (.*))?$/;

/**
 * Error name and message from the stderr text of a failed tslab cell.
 * Shapes seen from tslab 1.0: TypeScript diagnostics ("1:7 - Type 'string' is not assignable...");
 * a thrown Error printed by Node (optional "file:line / source / ^ / blank" context, then
 * "Name: message", then "    at ..." stack lines); a thrown non-Error value printed as is.
 */
function parseTslabError(stderrText) {
  const lines = stderrText.replace(/\r\n?/g, '\n').replace(/\s+$/, '').split('\n');
  const diagnostics = lines.map((l) => COMPILE_LINE.exec(l)).filter(Boolean);
  if (diagnostics.length > 0) {
    return {
      name: 'TypeScript error',
      message: diagnostics.map((m) => `line ${m[1]}, column ${m[2]}: ${m[3]}`).join('; '),
    };
  }
  const firstAt = lines.findIndex((l) => /^\s+at /.test(l));
  const end = firstAt >= 0 ? firstAt : lines.length;
  let start = 0;
  for (let i = end - 1; i >= 0; i--) {
    if (lines[i].trim() === '') {
      start = i + 1;
      break;
    }
  }
  const region = lines.slice(start, end).filter((l) => l.trim() !== '');
  if (firstAt >= 0) {
    // Prefer a line whose name looks like an error class; console.error lines may come first.
    const looksLikeError = (name) => /(?:Error|Exception)$/.test(name);
    for (const strict of [true, false]) {
      for (let i = 0; i < region.length; i++) {
        const m = ERROR_HEADER.exec(region[i]);
        if (m && (!strict || looksLikeError(m[1]))) {
          const message = [m[3] ?? '', ...region.slice(i + 1)].join('\n').trim();
          return { name: m[2] ? `${m[1]} [${m[2]}]` : m[1], message: message === '' ? '(no message)' : message };
        }
      }
    }
  }
  const text = region.join('\n').trim();
  return { name: 'Thrown value', message: text === '' ? '(no message)' : text };
}

/** The failing cell from the hook line, or from nbconvert's CellExecutionError text. */
function findCellFailure(stderr) {
  const hookLine = stderr.split('\n').find((l) => l.startsWith(HOOK_MARKER));
  if (hookLine) {
    let record;
    try {
      record = JSON.parse(hookLine.slice(HOOK_MARKER.length));
    } catch {
      record = null;
    }
    if (record) {
      let error;
      const errorOutput = record.outputs.find((o) => o.kind === 'error');
      if (record.ename) error = { name: record.ename, message: record.evalue };
      else if (errorOutput && errorOutput.ename) error = { name: errorOutput.ename, message: errorOutput.evalue };
      else {
        const stderrText = record.outputs.filter((o) => o.kind === 'stderr').map((o) => o.text).join('');
        error = parseTslabError(stderrText);
      }
      return { cellNumber: record.cellIndex + 1, source: record.source, ...error };
    }
  }
  const m = /An error occurred while executing the following cell:\n-+\n([\s\S]*?)\n-+\n([\s\S]*)$/.exec(stderr);
  if (m) {
    const tail = m[2].trim().split('\n');
    const last = (tail[tail.length - 1] || '').trim();
    const parts = /^(.*?):(?:\s+(.*))?$/.exec(last);
    const name = parts ? parts[1] : last;
    const message = parts && parts[2] ? parts[2].trim() : '';
    return { cellNumber: null, source: m[1], name: name === '<Error>' ? 'Error' : name, message: message || '(no message from the kernel)' };
  }
  return null;
}

/** The last Python exception line of nbconvert's stderr, for failures that are not a cell's. */
function lastPythonError(stderr) {
  const lines = stderr.trim().split('\n');
  for (let i = lines.length - 1; i >= 0; i--) {
    if (/^[\w.]+(?:Error|Exception|Exit)\b/.test(lines[i])) return lines[i];
  }
  return lines[lines.length - 1] || '(no output)';
}

/** Remove <script src> / <link href> tags that load files from elsewhere; data: URIs stay. */
function stripExternalResources(html) {
  const removed = [];
  const out = html
    .replace(/<script\b[^>]*\bsrc\s*=\s*["']?(?!data:)([^"'\s>]+)["']?[^>]*>\s*<\/script>/gi, (_m, src) => {
      removed.push(src);
      return '';
    })
    .replace(/<link\b[^>]*\bhref\s*=\s*["']?(?!data:)([^"'\s>]+)["']?[^>]*>/gi, (_m, href) => {
      removed.push(href);
      return '';
    });
  return { html: out, removed };
}

/**
 * Run nbconvert and watch it: progress lines from the hooks say which cell runs. A cell running
 * past its timeout (nbclient's own limit plus a margin) or a kernel that has not shut down
 * `shutdownWait` seconds after the last cell gets the whole process group stopped, so that a
 * render always ends; `stopped` then says which.
 */
function runNbconvert(python, args, env, verbose, limits = { cellTimeout: CELL_TIMEOUT_S, shutdownWait: SHUTDOWN_WAIT_S, lastCell: -1 }) {
  return new Promise((resolve) => {
    const child = spawn(python, args, { env, stdio: ['ignore', 'pipe', 'pipe'], detached: true });
    let stdout = '';
    let stderr = '';
    let pending = '';
    const state = { cell: -1, cellStarted: 0, finishedAt: 0, stopped: null };
    const stopGroup = () => {
      try {
        process.kill(-child.pid, 'SIGKILL');
      } catch {
        /* already gone */
      }
    };
    const onExit = () => stopGroup();
    process.once('exit', onExit);
    const watch = setInterval(() => {
      const now = Date.now();
      if (state.finishedAt === 0 && state.cell >= 0 && now - state.cellStarted > (limits.cellTimeout + 30) * 1000) {
        state.stopped = { kind: 'cell', index: state.cell };
      } else if (state.finishedAt > 0 && now - state.finishedAt > limits.shutdownWait * 1000) {
        state.stopped = { kind: 'shutdown' };
      }
      if (state.stopped) {
        clearInterval(watch);
        stopGroup();
      }
    }, 500);
    child.stdout.on('data', (d) => {
      stdout += d;
      if (verbose) process.stdout.write(d);
    });
    child.stderr.on('data', (d) => {
      stderr += d;
      if (verbose) process.stderr.write(d);
      pending += d;
      let nl;
      while ((nl = pending.indexOf('\n')) >= 0) {
        const line = pending.slice(0, nl);
        pending = pending.slice(nl + 1);
        if (!line.startsWith(PROGRESS_MARKER)) continue;
        let p;
        try {
          p = JSON.parse(line.slice(PROGRESS_MARKER.length));
        } catch {
          continue;
        }
        if (p.event === 'start') {
          state.cell = p.index;
          state.cellStarted = Date.now();
        } else if (p.event === 'complete' || (p.event === 'done' && p.index === limits.lastCell)) {
          if (state.finishedAt === 0) state.finishedAt = Date.now();
        }
      }
    });
    const finish = (status) => {
      clearInterval(watch);
      process.removeListener('exit', onExit);
      resolve({ status, stdout, stderr, stopped: state.stopped, cell: state.cell });
    };
    child.on('error', (err) => {
      stderr += String(err);
      finish(null);
    });
    child.on('close', (status) => finish(status));
  });
}

function firstLine(text) {
  const line = String(text).split('\n').find((l) => l.trim() !== '') || '';
  return line.length > 100 ? line.slice(0, 97) + '...' : line;
}

async function renderNotebook(options) {
  const notebook = path.resolve(options.notebook);
  if (!fs.existsSync(notebook)) throw Object.assign(new Error(`notebook not found: ${options.notebook}`), { exitCode: 2 });
  if (!notebook.endsWith('.ipynb')) throw Object.assign(new Error(`expected an .ipynb file, got ${options.notebook}`), { exitCode: 2 });
  const python = pythonPath();
  const check = checkNbconvert(python);
  if (!check.ok) {
    throw Object.assign(new Error(`Jupyter nbconvert is not available (${check.reason}); install it with: ${INSTALL_HINT}`), { exitCode: 1 });
  }
  const kernel = registerKernel();
  const outDir = path.resolve(options.out);
  fs.mkdirSync(outDir, { recursive: true });
  const scratch = fs.mkdtempSync(path.join(os.tmpdir(), 'quadrat-render-'));
  try {
    const hookFile = path.join(scratch, 'quadrat_render_config.py');
    fs.writeFileSync(hookFile, HOOK_CONFIG);
    const env = {
      ...process.env,
      JUPYTER_PATH: [kernel.jupyterPath, process.env.JUPYTER_PATH].filter(Boolean).join(path.delimiter),
      // Connection files go to a scratch folder instead of the user's Jupyter runtime folder.
      JUPYTER_RUNTIME_DIR: path.join(scratch, 'runtime'),
      QUADRAT_HTML_RENDER: '1',
      PYDEVD_DISABLE_FILE_VALIDATION: '1',
    };
    const args = [
      '-m', 'nbconvert',
      '--to', 'html',
      '--execute',
      `--ExecutePreprocessor.kernel_name=${kernel.kernelName}`,
      `--ExecutePreprocessor.timeout=${Math.ceil(options.cellTimeout || CELL_TIMEOUT_S)}`,
      `--config=${hookFile}`,
      '--output-dir', outDir,
      notebook,
    ];
    const cells = JSON.parse(fs.readFileSync(notebook, 'utf8')).cells || [];
    let lastCell = -1;
    cells.forEach((c, i) => { if (c.cell_type === 'code') lastCell = i; });
    const cellTimeout = options.cellTimeout || CELL_TIMEOUT_S;
    const shutdownWait = options.shutdownWait || SHUTDOWN_WAIT_S;
    const run = await runNbconvert(python, args, env, options.verbose, { cellTimeout, shutdownWait, lastCell });
    const name = path.basename(notebook);
    const cellText = (i) => (i >= 0 && cells[i] ? firstLine([].concat(cells[i].source).join('')) : '');
    if (run.stopped && run.stopped.kind === 'shutdown') {
      throw Object.assign(new Error(`${name}: every cell ran, but the kernel did not shut down within ${shutdownWait} s; it was stopped and no HTML was written (run again; --shutdown-wait sets the wait)`), { exitCode: 1 });
    }
    const timedOut = (run.stopped && run.stopped.kind === 'cell') || /CellTimeoutError|Cell execution timed out/.test(run.stderr);
    if (run.status !== 0 && timedOut) {
      const index = run.stopped ? run.stopped.index : run.cell;
      throw Object.assign(new Error(`${name}: cell ${index + 1} did not finish within ${cellTimeout} s and was stopped (--cell-timeout sets the limit)\n  cell starts: ${cellText(index)}`), { exitCode: 1 });
    }
    if (run.status !== 0) {
      const failure = findCellFailure(run.stderr);
      if (failure) {
        const where = failure.cellNumber === null ? 'a cell' : `cell ${failure.cellNumber}`;
        const lines = [`${where} failed: ${failure.name}: ${failure.message}`, `  cell starts: ${firstLine(failure.source)}`];
        throw Object.assign(new Error(lines.join('\n')), { exitCode: 1 });
      }
      const hint = options.verbose ? '' : ' (run with --verbose for the full nbconvert log)';
      throw Object.assign(new Error(`nbconvert failed: ${lastPythonError(run.stderr)}${hint}`), { exitCode: 1 });
    }
    const htmlFile = path.join(outDir, path.basename(notebook, '.ipynb') + '.html');
    if (!fs.existsSync(htmlFile)) throw Object.assign(new Error(`nbconvert reported success but ${htmlFile} is missing`), { exitCode: 1 });
    const { html, removed } = stripExternalResources(fs.readFileSync(htmlFile, 'utf8'));
    fs.writeFileSync(htmlFile, html);
    return { htmlFile, bytes: Buffer.byteLength(html), removed };
  } finally {
    fs.rmSync(scratch, { recursive: true, force: true });
  }
}

module.exports = { renderNotebook, parseTslabError, findCellFailure, stripExternalResources, parseArgs };

if (require.main === module) {
  let args;
  try {
    args = parseArgs(process.argv.slice(2));
  } catch (err) {
    console.error(`render-notebook: ${err.message}\n${usage()}`);
    process.exit(2);
  }
  if (args.help) {
    console.log(usage());
    process.exit(0);
  }
  renderNotebook(args).then(
    (r) => {
      const rel = path.relative(process.cwd(), r.htmlFile);
      console.log(`Wrote ${rel.startsWith('..') ? r.htmlFile : rel} (${(r.bytes / 1024).toFixed(0)} kB)`);
      if (args.verbose && r.removed.length > 0) console.log(`Removed external references: ${r.removed.join(', ')}`);
    },
    (err) => {
      console.error(`render-notebook: ${err.message}`);
      process.exit(err.exitCode || 1);
    },
  );
}
