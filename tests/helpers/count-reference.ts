/**
 * Reference values for the count and detection models (data/reference/counts, written by
 * make_count_reference.py with statsmodels and scipy). With CI or QUADRAT_LIVE_REFERENCE set, the
 * script is re-run (its --quick mode: everything but the slow marginal maximisations) into a
 * temporary folder once per test file, and the regenerated values must equal the committed ones.
 */
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'fs';
import { tmpdir } from 'os';
import { join } from 'path';
import { spawnSync } from 'child_process';

export const COUNT_REFERENCE_DIR = join(__dirname, '..', '..', 'data', 'reference', 'counts');
const SCRIPT = join(COUNT_REFERENCE_DIR, 'make_count_reference.py');
const PYTHON = '/usr/bin/python3';
const LIVE = Boolean(process.env.CI || process.env.QUADRAT_LIVE_REFERENCE);

let liveDir: string | null = null;

function regenerate(): string {
  if (liveDir) return liveDir;
  const dir = mkdtempSync(join(tmpdir(), 'quadrat-counts-'));
  if (!existsSync(PYTHON)) throw new Error(`${PYTHON} is missing: install Debian's python3-statsmodels python3-scipy python3-pandas, or unset CI and QUADRAT_LIVE_REFERENCE`);
  const run = spawnSync(PYTHON, [SCRIPT, '--quick', '--out', dir], { encoding: 'utf8' });
  if (run.status !== 0) throw new Error(`make_count_reference.py failed: ${run.stderr}`);
  liveDir = dir;
  process.on('exit', () => rmSync(dir, { recursive: true, force: true }));
  return dir;
}

/** Drop the entries the --quick run does not produce. */
function quickPart(value: Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(value)) if (!k.startsWith('marginal_ml')) out[k] = v;
  return out;
}

/** The committed JSON of a case (checked against a fresh run under CI). */
export function countReference<T = any>(name: string): T {
  const committed = JSON.parse(readFileSync(join(COUNT_REFERENCE_DIR, `${name}.json`), 'utf8'));
  if (LIVE) {
    const fresh = JSON.parse(readFileSync(join(regenerate(), `${name}.json`), 'utf8'));
    const a = JSON.stringify(quickPart(committed));
    const b = JSON.stringify(quickPart(fresh));
    if (a !== b) throw new Error(`data/reference/counts/${name}.json differs from a fresh run of make_count_reference.py`);
  }
  return committed as T;
}
