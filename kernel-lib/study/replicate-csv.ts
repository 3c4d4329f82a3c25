import { csvField, csvNumber } from '../data/csv-field';
import type { ReplicateKind, ReplicateRow, ReplicateStatus } from './replicate-row';

/**
 * The per-replicate table on disk: one CSV row per scenario × replicate × variant × parameter.
 * Numbers are written with JavaScript's shortest round-trip form, so reading gives back the exact
 * doubles; NaN is an empty cell, infinities are "Inf" / "-Inf".
 */
const REPLICATE_COLUMNS = [
  'scenario', 'variant', 'replicate', 'parameter', 'kind', 'truth', 'estimate', 'se', 'lower', 'upper', 'df', 'status', 'reason',
] as const;

export const REPLICATE_HEADER = REPLICATE_COLUMNS.join(',');


export function replicateRowsToCsv(rows: readonly ReplicateRow[], header = false): string {
  let out = header ? `${REPLICATE_HEADER}\n` : '';
  // the leading text fields, truth and df repeat from row to row: format each distinct value once
  const textCache = new Map<string, string>();
  const numCache = new Map<number, string>();
  const text = (s: string) => {
    let t = textCache.get(s);
    if (t === undefined) { t = csvField(s); textCache.set(s, t); }
    return t;
  };
  const repeated = (v: number) => {
    let t = numCache.get(v);
    if (t === undefined) { t = csvNumber(v); numCache.set(v, t); }
    return t;
  };
  for (const r of rows) {
    out += `${text(r.scenario)},${text(r.variant)},${r.replicate},${text(r.parameter)},${r.kind},${repeated(r.truth)},` +
      `${csvNumber(r.estimate)},${csvNumber(r.se)},${csvNumber(r.lower)},${csvNumber(r.upper)},${repeated(r.df)},${r.status},${text(r.reason)}\n`;
  }
  return out;
}

/** Split one CSV record into fields (RFC 4180 quoting); returns the fields and the index after the record. */
function readRecord(text: string, start: number): { fields: string[]; next: number } {
  const fields: string[] = [];
  let i = start;
  let field = '';
  while (i <= text.length) {
    const c = text[i];
    if (c === '"' && field === '') {
      i++;
      while (i < text.length) {
        if (text[i] === '"') {
          if (text[i + 1] === '"') { field += '"'; i += 2; continue; }
          i++;
          break;
        }
        field += text[i++];
      }
      continue;
    }
    if (c === ',' ) { fields.push(field); field = ''; i++; continue; }
    if (c === '\n' || c === undefined) { fields.push(field); return { fields, next: i + 1 }; }
    if (c === '\r') { i++; continue; }
    field += c;
    i++;
  }
  fields.push(field);
  return { fields, next: text.length + 1 };
}

function parseNum(s: string, where: string): number {
  if (s === '') return NaN;
  if (s === 'Inf') return Infinity;
  if (s === '-Inf') return -Infinity;
  const v = Number(s);
  if (Number.isNaN(v)) throw new Error(`${where}: expected a number, got "${s}"`);
  return v;
}

/** Read replicate rows written by replicateRowsToCsv (with or without the header line). */
export function parseReplicateCsv(text: string, source = 'replicates'): ReplicateRow[] {
  const rows: ReplicateRow[] = [];
  let pos = 0;
  let line = 0;
  while (pos < text.length) {
    line++;
    const end = text.indexOf('\n', pos);
    const stop = end < 0 ? text.length : end;
    let fields: string[];
    const raw = text.slice(pos, stop);
    if (raw.indexOf('"') < 0) {
      // no quoting on this line: a plain split is exact and far faster than the field reader
      fields = raw.endsWith('\r') ? raw.slice(0, -1).split(',') : raw.split(',');
      pos = stop + 1;
    } else {
      const rec = readRecord(text, pos);
      fields = rec.fields;
      line += countNewlines(text, pos, rec.next - 1);
      pos = rec.next;
    }
    if (fields.length === 1 && fields[0] === '') continue;
    if (fields[0] === 'scenario' && fields[1] === 'variant') continue;
    const where = `${source}, line ${line}`;
    if (fields.length !== REPLICATE_COLUMNS.length) {
      throw new Error(`${where}: expected ${REPLICATE_COLUMNS.length} fields, found ${fields.length}`);
    }
    rows.push({
      scenario: fields[0], variant: fields[1], replicate: parseNum(fields[2], where), parameter: fields[3],
      kind: fields[4] as ReplicateKind, truth: parseNum(fields[5], where), estimate: parseNum(fields[6], where),
      se: parseNum(fields[7], where), lower: parseNum(fields[8], where), upper: parseNum(fields[9], where),
      df: parseNum(fields[10], where), status: fields[11] as ReplicateStatus, reason: fields[12],
    });
  }
  return rows;
}

/** Line breaks inside a quoted record (so error messages keep counting lines right). */
function countNewlines(text: string, from: number, to: number): number {
  let k = 0;
  for (let i = from; i < to; i++) if (text.charCodeAt(i) === 10) k++;
  return k;
}
