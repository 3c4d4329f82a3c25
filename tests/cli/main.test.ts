import { describe, expect, it, vi } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { COMMAND_HELP, SUBCOMMANDS } from '../../kernel-lib/cli/help';
import { main } from '../../kernel-lib/cli/main';
import { designFromSurvey } from '../../kernel-lib/design/from-survey';
import { parseDesign } from '../../kernel-lib/design/parse';
import { readCsvFile } from '../../kernel-lib/data/csv';

const ROOT = join(__dirname, '..', '..');
const BIN = join(ROOT, 'bin', 'quadrat.js');
const SURVEY = join(ROOT, 'data', 'demo-survey.csv');
const MODEL = join(ROOT, 'data', 'demo-model.json');

function quadrat(...args: string[]) {
  return spawnSync(process.execPath, [BIN, ...args], { encoding: 'utf8', cwd: ROOT });
}

/** Run the command line in this process; returns the exit code and what it wrote. */
async function quadratHere(...args: string[]): Promise<{ status: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const out = vi.spyOn(process.stdout, 'write').mockImplementation((s) => ((stdout += String(s)), true));
  const err = vi.spyOn(process.stderr, 'write').mockImplementation((s) => ((stderr += String(s)), true));
  try {
    const status = await main(args);
    return { status, stdout, stderr };
  } finally {
    out.mockRestore();
    err.mockRestore();
  }
}

// Command-line conventions (POSIX utility conventions and GNU coding standards, "--help" and
// "--version": print and exit successfully) — common practice, no source beyond those.
describe('quadrat --help and --version', () => {
  const commands = Object.keys(COMMAND_HELP);

  it.each(commands)('"quadrat %s --help" prints its usage and options and exits 0', async (name) => {
    const r = await quadratHere(...name.split(' '), '--help');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toContain(`usage: quadrat ${name}`);
    expect(r.stdout).toMatch(/^options:$/m);
    for (const [option] of COMMAND_HELP[name].options) expect(r.stdout).toContain(option);
    expect(r.stderr).toBe('');
  });

  it.each(Object.keys(SUBCOMMANDS))('"quadrat %s --help" lists every subcommand and exits 0; without a subcommand it exits 2', async (name) => {
    const r = await quadratHere(name, '--help');
    expect(r.status).toBe(0);
    for (const sub of SUBCOMMANDS[name]) expect(r.stdout).toContain(`quadrat ${name} ${sub}`);
    const bare = await quadratHere(name);
    expect(bare.status).toBe(2);
    expect(bare.stderr).toContain(`quadrat ${name} ${SUBCOMMANDS[name][0]}`);
  });

  it('every option a help text lists is accepted by its command (no "Unknown option")', async () => {
    for (const name of commands) {
      if (name === 'demo') continue; // runs a whole study
      for (const [listed] of COMMAND_HELP[name].options) {
        const option = listed.split(' ')[0];
        // a missing file or folder fails later with its own message, not with an unknown option
        const r = await quadratHere(...name.split(' '), join(tmpdir(), 'no-such-input'), option, ...(listed.includes('<') ? ['1'] : []));
        expect(r.status, `${name} ${option}`).toBe(2);
        expect(r.stderr, `${name} ${option}`).not.toMatch(/Unknown option/i);
      }
    }
  });

  it('quadrat --help lists every command; --version prints the package version', () => {
    const r = quadrat('--help');
    expect(r.status).toBe(0);
    for (const name of Object.keys(COMMAND_HELP)) expect(r.stdout).toContain(`  ${name}`);
    const v = quadrat('--version');
    expect(v.status).toBe(0);
    const { version } = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')) as { version: string };
    expect(v.stdout.trim()).toBe(`quadrat ${version}`);
  });

  it('an unknown command exits 2 with the usage on stderr', async () => {
    const r = await quadratHere('fitt');
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/unknown command "fitt"/);
  });
});

describe('quadrat design from-survey', () => {
  it('writes the design the library derives from the pilot, and it parses', () => {
    const out = join(mkdtempSync(join(tmpdir(), 'quadrat-design-')), 'design.json');
    const r = quadrat('design', 'from-survey', SURVEY, '--model', MODEL, '--out', out, '--seed', '7', '--replicates', '300');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toContain(`design written to ${out}`);
    const written = JSON.parse(readFileSync(out, 'utf8'));
    // same call through the library (tests/data/describe-survey.test.ts checks its content against the pilot fit)
    const expected = designFromSurvey(readCsvFile(SURVEY), JSON.parse(readFileSync(MODEL, 'utf8')), { seed: 7, replicates: 300 }).design;
    expect(written).toEqual(JSON.parse(JSON.stringify(expected)));
    expect(written.truth.fixed).toHaveProperty('grazing=ungrazed');
    expect(() => parseDesign(written)).not.toThrow();
  });

  it('prints the design when no --out is given, notes on stderr; refuses a missing --model', () => {
    const r = quadrat('design', 'from-survey', SURVEY, '--model', MODEL);
    expect(r.status, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout).response).toBe('sedge_height');
    expect(r.stderr).toMatch(/^note: /m);
    const bad = quadrat('design', 'from-survey', SURVEY);
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/--model <model\.json> is required/);
  });
});

describe('quadrat with its output piped into a reader that stops early', () => {
  it('a closed stdout (EPIPE, as with "| head -3") ends quietly with exit code 0', async () => {
    // common practice, no source: command-line tools stop silently when their reader goes away
    const child = spawn(process.execPath, [BIN, 'fit', '--json', '--data', 'data/demo-survey.csv', '--model', 'data/demo-model.json'], {
      cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'],
    });
    // close the reading end before the fit prints anything, as a reader that has had enough does
    child.stdout.destroy();
    let stderr = '';
    child.stderr.on('data', (d: Buffer) => { stderr += d.toString(); });
    const code = await new Promise<number | null>((resolve) => child.on('close', (c) => resolve(c)));
    expect(stderr).toBe('');
    expect(code).toBe(0);
  });
});
