/**
 * The one owner of a study folder's layout: every file and folder name a study, a plan or a merge
 * writes or reads is built here, so a name changes in one place.
 *
 *   study.json        the design as given, the run settings and a fingerprint of both (./study-folder)
 *   scenarios.json    index, key and grid values of every scenario
 *   study.lock        the process and run writing the folder (./folder-lock), while it runs
 *   batches/          one CSV per finished batch (sSSSS-bBBBBBB.csv) and its .check (./batch-files)
 *   replicates.csv    all batches in study order (written when every batch is present)
 *   metrics.csv/.json the summary with Monte Carlo SEs
 *   report.html       the HTML summary (cli, notebooks)
 * A plan folder holds plan.json and values/<value>-<fingerprint>/ (one study-like folder per
 * candidate value, with value.json and batches/). Temporary files end in `.tmp-<pid>`.
 */
import { join } from 'node:path';
import type { Batch } from './batch-plan';

const BATCHES = 'batches';
const CHECK_SUFFIX = '.check';
const TEMPORARY = /\.tmp-\d+$/;

export const manifestPath = (folder: string): string => join(folder, 'study.json');
export const scenariosPath = (folder: string): string => join(folder, 'scenarios.json');
export const lockPath = (folder: string): string => join(folder, 'study.lock');
export const replicatesPath = (folder: string): string => join(folder, 'replicates.csv');
export const metricsJsonPath = (folder: string): string => join(folder, 'metrics.json');
export const metricsCsvPath = (folder: string): string => join(folder, 'metrics.csv');
export const reportPath = (folder: string): string => join(folder, 'report.html');

/** The folder of batch files. */
export const batchesFolder = (folder: string): string => join(folder, BATCHES);

/** File name of a batch: scenario and batch number, zero-padded so names sort in study order. */
export function batchFileName(b: Pick<Batch, 'scenario' | 'batch'>): string {
  return `s${String(b.scenario).padStart(4, '0')}-b${String(b.batch).padStart(6, '0')}.csv`;
}

/** Whether a file in the batches folder is a batch (not its check or a temporary file). */
export const isBatchFile = (name: string): boolean => name.endsWith('.csv');

/** Path of a batch file given its name (see batchFileName). */
export const batchPath = (folder: string, name: string): string => join(folder, BATCHES, name);

/** Path of a batch's check file (rows, checksum, study and run). */
export const batchCheckPath = (folder: string, name: string): string => `${batchPath(folder, name)}${CHECK_SUFFIX}`;

/** The temporary name a file is written under before being renamed over `path`. */
export const temporaryPath = (path: string): string => `${path}.tmp-${process.pid}`;

/** Whether a file name is a temporary left by a run (of any process). */
export const isTemporary = (name: string): boolean => TEMPORARY.test(name);

/** The folders where temporary files may be left: the folder itself and its batches. */
export const temporaryFolders = (folder: string): string[] => [folder, batchesFolder(folder)];

/** A throw-away file proving that the folder is writable. */
export const writeProbePath = (folder: string): string => join(folder, `.write-probe-${process.pid}`);

/** Default folder name of a study, from its fingerprint: changed settings give a new folder. */
export const studyFolderNameOf = (fingerprint: string): string => `study-${fingerprint.slice(0, 10)}`;

/** The folder of one case of a plan from a pilot survey ("lower end" -> <out>/lower-end). */
export const planCaseFolder = (out: string, name: string): string => join(out, name.replace(' ', '-'));

/** The Vega-Lite spec of a plan's k-th curve (1-based). */
export const planCurvePath = (out: string, k: number): string => join(out, `plan-curve-${k}.vl.json`);

/** plan.json of a sample-size plan's output folder. */
export const planFilePath = (out: string): string => join(out, 'plan.json');

/** The folder of one candidate value of a plan (one per value and design): "12", "0.5", "-1.25". */
export function planValueFolder(out: string, value: number, fingerprint: string): string {
  return join(out, 'values', `${String(value).replace(/[^0-9A-Za-z.+-]/g, '_')}-${fingerprint.slice(0, 8)}`);
}

/** value.json: the identity of a plan value's folder. */
export const planValueIdentityPath = (folder: string): string => join(folder, 'value.json');
