/**
 * replicates.csv and the metrics, assembled while a study runs: batches are taken in study order as
 * soon as they are on disk (or handed over by the thread that ran them), appended to a temporary
 * replicates.csv and added to the metrics' accumulators. Finishing a study then only flushes and
 * renames the file and reads the metrics off the accumulators, and no more rows are held than one
 * batch (plus, for a study small enough, the rows handed back to the caller).
 */
import { closeSync, fsyncSync, openSync, readFileSync, renameSync, rmSync, writeSync } from 'node:fs';
import { csvField, csvNumber } from '../data/csv-field';
import { parseDesign } from '../design/parse';
import type { Batch } from './batch-plan';
import { readCheckedBatch, writeAtomic } from './batch-files';
import { batchFileName, metricsCsvPath, metricsJsonPath, replicatesPath, temporaryPath } from './folder-layout';
import { MetricsBuilder, type MetricRow } from './metrics';
import { REPLICATE_HEADER, parseReplicateCsv } from './replicate-csv';
import type { ReplicateRow } from './replicate-row';
import { readManifest } from './study-folder';
import { variantLevels } from './variant-levels';
import { variantScales } from './variant-scales';

/** Rows handed back in memory up to this many; a larger study's rows are read from replicates.csv when asked for. */
const KEEP_ROWS = 250_000;

export interface AssembledStudy {
  metrics: MetricRow[];
  /** The rows of replicates.csv (read from the file on first access when the study is large). */
  rows: ReplicateRow[];
}

export class ReplicateAssembly {
  private next = 0;
  private fd: number | null = null;
  private readonly path: string;
  private readonly tmp: string;
  private readonly builder = new MetricsBuilder();
  private kept: ReplicateRow[] | null = [];
  private readonly handed = new Map<number, { text: string; rows: ReplicateRow[] }>();
  private failure: Error | null = null;

  /**
   * `batches`: every batch of the study in study order; `study`: the fingerprint each batch must
   * carry; `keepRows`: the most rows handed back in memory (beyond, they are read from the file).
   */
  constructor(
    private readonly folder: string, private readonly batches: readonly Batch[], private readonly study = '', private readonly keepRows = KEEP_ROWS,
  ) {
    this.path = replicatesPath(folder);
    this.tmp = temporaryPath(this.path);
  }

  /** Every batch has been taken. */
  get complete(): boolean {
    return this.next === this.batches.length;
  }

  /** A batch this thread has just run and written: its CSV text and rows (no need to read it back). */
  offer(batch: Batch, text: string, rows: ReplicateRow[]): void {
    this.handed.set(batch.ordinal, { text, rows });
  }

  /**
   * Take batches in study order while they are handed over or `onDisk` says they are written. A
   * batch failing its check stops the assembly; finish() then names it.
   */
  advance(onDisk: (b: Batch) => boolean): void {
    while (this.failure === null && this.next < this.batches.length) {
      const b = this.batches[this.next];
      const handed = this.handed.get(b.ordinal);
      if (handed === undefined && !onDisk(b)) return;
      try {
        if (handed !== undefined) {
          this.handed.delete(b.ordinal);
          this.take(handed.text, handed.rows.map(asRead));
        } else {
          const name = batchFileName(b);
          const r = readCheckedBatch(this.folder, name, this.study);
          if ('problem' in r) throw new Error(`batch ${name} in "${this.folder}" failed its check: ${r.problem}; run the study again to recompute it`);
          this.take(r.text, parseReplicateCsv(r.text, name));
        }
      } catch (e) {
        this.failure = e as Error;
        return;
      }
      this.next++;
    }
  }

  private take(text: string, rows: ReplicateRow[]): void {
    if (this.fd === null) {
      this.fd = openSync(this.tmp, 'w');
      writeSync(this.fd, `${REPLICATE_HEADER}\n`);
    }
    writeSync(this.fd, text);
    this.builder.add(rows);
    if (this.kept !== null) {
      if (this.kept.length + rows.length > this.keepRows) this.kept = null;
      else for (const r of rows) this.kept.push(r);
    }
  }

  /**
   * Write replicates.csv and the metrics once every batch is taken; null (and nothing written)
   * when some are missing. Throws when a batch failed its check.
   */
  finish(): AssembledStudy | null {
    if (this.failure) {
      this.abandon();
      throw this.failure;
    }
    if (!this.complete) {
      this.abandon();
      return null;
    }
    if (this.fd === null) {
      this.fd = openSync(this.tmp, 'w');
      writeSync(this.fd, `${REPLICATE_HEADER}\n`);
    }
    try {
      fsyncSync(this.fd);
    } finally {
      closeSync(this.fd);
      this.fd = null;
    }
    renameSync(this.tmp, this.path);
    const design = parseDesign(readManifest(this.folder).design);
    const metrics = this.builder.result({ levels: variantLevels(design), otherScale: variantScales(design) });
    writeAtomic(metricsJsonPath(this.folder), JSON.stringify(metrics, null, 1));
    writeAtomic(metricsCsvPath(this.folder), metricsToCsv(metrics));
    const kept = this.kept;
    const path = this.path;
    let rows: ReplicateRow[] | null = kept;
    const out = { metrics } as AssembledStudy;
    Object.defineProperty(out, 'rows', {
      enumerable: true,
      get: () => (rows ??= parseReplicateCsv(readFileSync(path, 'utf8'), 'replicates.csv')),
    });
    return out;
  }

  /** Stop without writing replicates.csv (an interrupted run): the temporary file goes. */
  abandon(): void {
    if (this.fd !== null) {
      closeSync(this.fd);
      this.fd = null;
    }
    rmSync(this.tmp, { force: true });
  }
}

/** A row as read back from its CSV text: -0 is written "0" and reads as 0. */
function asRead(row: ReplicateRow): ReplicateRow {
  if (row.truth === 0) row.truth = 0;
  if (row.estimate === 0) row.estimate = 0;
  if (row.se === 0) row.se = 0;
  if (row.lower === 0) row.lower = 0;
  if (row.upper === 0) row.upper = 0;
  if (row.df === 0) row.df = 0;
  return row;
}

function metricsToCsv(metrics: MetricRow[]): string {
  const cols = ['scenario', 'variant', 'parameter', 'kind', 'metric', 'value', 'mcse', 'n', 'note'] as const;
  const lines = [cols.join(',')];
  for (const m of metrics) {
    lines.push(cols.map((c) => (c === 'note' ? csvField(m.note ?? '') : typeof m[c] === 'string' ? csvField(m[c] as string) : csvNumber(m[c] as number))).join(','));
  }
  return `${lines.join('\n')}\n`;
}
