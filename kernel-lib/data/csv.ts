/**
 * CSV reading into a column set, without dependencies.
 *
 * Quoting follows RFC 4180 (Shafranovich 2005): a field in double quotes may hold the
 * delimiter, line breaks and doubled quotes (""). Records end with LF, CRLF or CR. Beyond it:
 * - The first record is the header; names must be non-empty and unique.
 * - Blank lines are skipped; a UTF-8 byte order mark is ignored.
 * - A cell is missing (null) when, after trimming spaces, it is empty, "NA" or "NaN".
 *   Quoting does not change this: exporters quote inconsistently.
 * - A column becomes numbers when every non-missing cell is a decimal number
 *   (e.g. "3", "-0.5", "1e-3"); otherwise its cells stay text, exactly as written.
 * - A record with a different number of fields than the header is an error naming its line.
 */
import { readFileSync } from 'fs';
import { QuadratInputError } from '../model/errors';
import type { Columns } from './columns';

export interface CsvOptions {
  /** Field delimiter, one character. Default ",". */
  delimiter?: string;
  /** Name used in error messages (e.g. the file path). Default: none. */
  source?: string;
}

const QUOTE = 34; // "
const LF = 10;
const CR = 13;
const NUMBER_PATTERN = /^\s*[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?\s*$/;

/** Parse CSV text into columns (numbers where a whole column is numeric, else text; missing -> null). */
export function parseCsv(text: string, options: CsvOptions = {}): Columns {
  const delimiter = options.delimiter ?? ',';
  const where = options.source === undefined ? '' : `${options.source} `;
  if (delimiter.length !== 1 || delimiter === '"' || delimiter === '\n' || delimiter === '\r') {
    throw new QuadratInputError(`csv delimiter: expected one character other than a quote or line break, got ${JSON.stringify(delimiter)}`);
  }
  const records = splitRecords(text, delimiter.charCodeAt(0), where);
  if (records.length === 0) throw new QuadratInputError(`${where}csv: no header row; the first line must name the columns`);

  const header = records[0].fields;
  const seen = new Map<string, number>();
  header.forEach((name, j) => {
    if (name.trim() === '') {
      throw new QuadratInputError(`${where}line ${records[0].line}: header field ${j + 1} is empty; every column needs a name`);
    }
    const earlier = seen.get(name);
    if (earlier !== undefined) {
      throw new QuadratInputError(`${where}line ${records[0].line}: duplicate column name "${name}" (fields ${earlier + 1} and ${j + 1})`, {
        column: name,
      });
    }
    seen.set(name, j);
  });

  const width = header.length;
  const n = records.length - 1;
  for (let r = 1; r <= n; r++) {
    const rec = records[r];
    if (rec.fields.length !== width) {
      throw new QuadratInputError(
        `${where}line ${rec.line}: expected ${width} fields as in the header, got ${rec.fields.length}`,
        { row: r },
      );
    }
  }

  const out: Columns = {};
  for (let j = 0; j < width; j++) {
    let numeric = true;
    for (let r = 1; r <= n && numeric; r++) {
      const cell = records[r].fields[j];
      if (!isMissingCell(cell) && !NUMBER_PATTERN.test(cell)) numeric = false;
    }
    const col = new Array<number | string | null>(n);
    for (let r = 1; r <= n; r++) {
      const cell = records[r].fields[j];
      col[r - 1] = isMissingCell(cell) ? null : numeric ? Number(cell) : cell;
    }
    out[header[j]] = col;
  }
  return out;
}

/** Read a CSV file (UTF-8) into columns; see parseCsv. Errors name the file. */
export function readCsvFile(path: string, options: Omit<CsvOptions, 'source'> = {}): Columns {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    throw new QuadratInputError(`${path}: cannot read the file (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
  return parseCsv(text, { ...options, source: path });
}

function isMissingCell(cell: string): boolean {
  const t = cell.trim();
  return t === '' || t === 'NA' || t === 'NaN';
}

interface CsvRecord {
  fields: string[];
  /** 1-based line on which the record starts. */
  line: number;
}

/** Split text into records of raw fields (quotes removed), skipping blank lines. */
function splitRecords(text: string, delim: number, where: string): CsvRecord[] {
  const len = text.length;
  let i = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  let line = 1;
  const records: CsvRecord[] = [];
  while (i < len) {
    const startLine = line;
    const fields: string[] = [];
    let onlyBlank = true;
    for (;;) {
      let field: string;
      if (text.charCodeAt(i) === QUOTE) {
        onlyBlank = false;
        const quoteLine = line;
        i++;
        let buf = '';
        let segment = i;
        for (;;) {
          if (i >= len) throw new QuadratInputError(`${where}line ${quoteLine}: a quoted field is not closed`);
          const c = text.charCodeAt(i);
          if (c === QUOTE) {
            if (text.charCodeAt(i + 1) === QUOTE) {
              buf += text.slice(segment, i + 1);
              i += 2;
              segment = i;
              continue;
            }
            buf += text.slice(segment, i);
            i++;
            break;
          }
          if (c === LF || (c === CR && text.charCodeAt(i + 1) !== LF)) line++;
          i++;
        }
        field = buf;
        if (i < len) {
          const c = text.charCodeAt(i);
          if (c !== delim && c !== LF && c !== CR) {
            throw new QuadratInputError(`${where}line ${line}: unexpected text after a closing quote; a quote inside a quoted field is written ""`);
          }
        }
      } else {
        const start = i;
        while (i < len) {
          const c = text.charCodeAt(i);
          if (c === delim || c === LF || c === CR) break;
          i++;
        }
        field = text.slice(start, i);
        if (field.length > 0) onlyBlank = false;
      }
      fields.push(field);
      if (i >= len) break;
      const c = text.charCodeAt(i);
      i++;
      if (c === delim) {
        onlyBlank = false;
        continue;
      }
      if (c === CR && text.charCodeAt(i) === LF) i++;
      line++;
      break;
    }
    if (!(onlyBlank && fields.length === 1)) records.push({ fields, line: startLine });
  }
  return records;
}
