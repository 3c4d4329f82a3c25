/**
 * CSV reading into a column set, without dependencies.
 *
 * Quoting follows RFC 4180 (Shafranovich 2005): a field in double quotes may hold the
 * delimiter, line breaks and doubled quotes (""). Records end with LF, CRLF or CR. Beyond it:
 * - The first record is the header; names must be non-empty and unique.
 * - Blank lines are skipped; a UTF-8 byte order mark is ignored.
 * - A cell is missing (null) when, after trimming spaces, it is empty or one of the missing-value
 *   markers (default MISSING_MARKERS: NA, na, N/A, n/a, NaN, ".", "-"; option `missing` replaces
 *   the list). Quoting does not change this: exporters quote inconsistently.
 * - A column becomes numbers when every non-missing cell is a decimal number (e.g. "3", "-0.5",
 *   "1e-3"; with `decimal: ","` also "0,5"). When most of its cells are numbers but some are not,
 *   the numbers become numbers and the other cells stay text: a model that uses the column then
 *   stops with a message naming the first such cell, instead of silently making a factor of it.
 *   Otherwise the cells stay text, exactly as written.
 * - A column whose numbers all use a decimal comma while `decimal` is "." is an error saying so,
 *   and so is a header with one field that holds semicolons or tabs (another delimiter).
 * - A record with a different number of fields than the header is an error naming its line.
 * readCsvFile also refuses UTF-16, other non-UTF-8 text and binary files (e.g. spreadsheets),
 * saying what it found.
 */
import { readFileSync } from 'fs';
import { QuadratInputError } from '../model/errors';
import type { Columns } from './columns';

/** Cells read as missing by default (after trimming spaces; the empty cell is always missing). */
export const MISSING_MARKERS: readonly string[] = ['NA', 'na', 'N/A', 'n/a', 'NaN', '.', '-'];

export interface CsvOptions {
  /** Field delimiter, one character. Default ",". */
  delimiter?: string;
  /** Decimal mark of numbers: "." (default) or ",". With "," the delimiter defaults to ";". */
  decimal?: string;
  /** Missing-value markers, replacing MISSING_MARKERS (empty cells are always missing). */
  missing?: readonly string[];
  /** Name used in error messages (e.g. the file path). Default: none. */
  source?: string;
}

const QUOTE = 34; // "
const LF = 10;
const CR = 13;
const NUMBER_PATTERN = /^\s*[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?\s*$/;
const COMMA_NUMBER_PATTERN = /^\s*[+-]?(?:\d+(?:,\d*)?|,\d+)(?:[eE][+-]?\d+)?\s*$/;

/** Whether a text cell is a number written with a decimal comma ("0,5"). */
export function looksLikeDecimalComma(cell: string): boolean {
  return cell.includes(',') && COMMA_NUMBER_PATTERN.test(cell);
}

/** The options with defaults filled in; throws naming the option (`field`: delimiter, decimal, missing). */
export function checkCsvOptions(options: CsvOptions): { delimiter: string; decimal: string; markers: Set<string> } {
  const decimal = options.decimal ?? '.';
  if (decimal !== '.' && decimal !== ',') {
    throw new QuadratInputError(`csv decimal: expected "." or ",", got ${JSON.stringify(decimal)}`, { field: 'decimal' });
  }
  const delimiter = options.delimiter ?? (decimal === ',' ? ';' : ',');
  if (delimiter.length !== 1 || delimiter === '"' || delimiter === '\n' || delimiter === '\r') {
    throw new QuadratInputError(`csv delimiter: expected one character other than a quote or line break, got ${JSON.stringify(delimiter)}`, { field: 'delimiter' });
  }
  if (delimiter === decimal) {
    throw new QuadratInputError(`csv delimiter: "${delimiter}" is also the decimal mark; use delimiter ";" with decimal ","`, { field: 'delimiter' });
  }
  const list = options.missing ?? MISSING_MARKERS;
  if (!Array.isArray(list) || list.some((m) => typeof m !== 'string')) {
    throw new QuadratInputError('csv missing: expected a list of texts that mark a missing value, e.g. ["NA", "-"]', { field: 'missing' });
  }
  return { delimiter, decimal, markers: new Set(['', ...list.map((m) => m.trim())]) };
}

/** Parse CSV text into columns (numbers where a column is numeric, else text; missing -> null). */
export function parseCsv(text: string, options: CsvOptions = {}): Columns {
  const { delimiter, decimal, markers } = checkCsvOptions(options);
  const where = options.source === undefined ? '' : `${options.source} `;
  const records = splitRecords(text, delimiter.charCodeAt(0), where);
  if (records.length === 0) throw new QuadratInputError(`${where}csv: no header row; the first line must name the columns`);

  const header = records[0].fields;
  if (header.length === 1 && options.delimiter === undefined) refuseOtherDelimiter(header[0], where, decimal);
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

  const isMissing = (cell: string) => markers.has(cell.trim());
  const pattern = decimal === ',' ? COMMA_NUMBER_PATTERN : NUMBER_PATTERN;
  const toNumber = decimal === ',' ? (cell: string) => Number(cell.replace(',', '.')) : Number;
  const out: Columns = {};
  for (let j = 0; j < width; j++) {
    let numbers = 0;
    let texts = 0;
    let commaNumbers = 0;
    let dotNumbers = 0;
    for (let r = 1; r <= n; r++) {
      const cell = records[r].fields[j];
      if (isMissing(cell)) continue;
      if (pattern.test(cell)) {
        numbers++;
        if (cell.includes('.')) dotNumbers++;
      }
      else {
        texts++;
        if (decimal === '.' && looksLikeDecimalComma(cell)) commaNumbers++;
      }
    }
    // every non-number a decimal-comma number and no decimal point anywhere: the file's convention, not a typo
    if (texts > 0 && commaNumbers === texts && dotNumbers === 0) {
      const r = records.findIndex((rec, i) => i > 0 && looksLikeDecimalComma(rec.fields[j]));
      throw new QuadratInputError(
        `${where}column "${header[j]}": numbers are written with a decimal comma (line ${records[r].line} has "${records[r].fields[j].trim()}"); ` +
          `read the file with decimal "," (command line: --decimal ,)`,
        { column: header[j], row: r },
      );
    }
    // all numbers: a numeric column; mostly numbers: numbers stay numbers, the odd cells text (see above)
    const perCell = texts === 0 || numbers > texts;
    const col = new Array<number | string | null>(n);
    for (let r = 1; r <= n; r++) {
      const cell = records[r].fields[j];
      col[r - 1] = isMissing(cell) ? null : perCell && pattern.test(cell) ? toNumber(cell) : cell;
    }
    out[header[j]] = col;
  }
  return out;
}

function refuseOtherDelimiter(field: string, where: string, decimal: string): void {
  for (const [ch, name, flag] of [[';', 'semicolons', ';'], ['\t', 'tabs', 'tab']] as const) {
    const count = field.split(ch).length - 1;
    if (count > 0) {
      const comma = ch === ';' && decimal === '.' ? ', and --decimal , if numbers are written "0,5"' : '';
      throw new QuadratInputError(
        `${where}csv: the header is one field holding ${count} ${name}: the file looks ${name === 'tabs' ? 'tab' : 'semicolon'}-separated; ` +
          `read it with delimiter "${ch === '\t' ? '\\t' : ch}" (command line: --delimiter ${flag}${comma})`,
        { field: 'delimiter' },
      );
    }
  }
}

/** Read a CSV file (UTF-8) into columns; see parseCsv. Errors name the file and what was found in it. */
export function readCsvFile(path: string, options: Omit<CsvOptions, 'source'> = {}): Columns {
  let bytes: Buffer;
  try {
    bytes = readFileSync(path);
  } catch (e) {
    throw new QuadratInputError(`${path}: cannot read the file (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
  return parseCsv(decodeText(bytes, path), { ...options, source: path });
}

/** UTF-8 text of a file, or an error saying what the bytes look like instead. */
function decodeText(bytes: Uint8Array, path: string): string {
  const saveAs = 'save it as CSV with UTF-8 encoding ("CSV UTF-8") and read that file';
  if ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff)) {
    const order = bytes[0] === 0xff ? 'little-endian' : 'big-endian';
    throw new QuadratInputError(`${path}: the file is UTF-16 text (${order} byte order mark); ${saveAs}`);
  }
  const head = bytes.subarray(0, Math.min(bytes.length, 4096));
  if (bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 3 && bytes[3] === 4) {
    throw new QuadratInputError(`${path}: the file is a zip archive (an .xlsx or .ods spreadsheet?), not CSV text; export the sheet as CSV (UTF-8)`);
  }
  if (bytes[0] === 0xd0 && bytes[1] === 0xcf && bytes[2] === 0x11 && bytes[3] === 0xe0) {
    throw new QuadratInputError(`${path}: the file is an old-style Office document (an .xls spreadsheet?), not CSV text; export the sheet as CSV (UTF-8)`);
  }
  const nul = head.indexOf(0);
  if (nul >= 0) {
    const zerosAt = (start: number) => {
      let z = 0;
      for (let i = start; i < head.length; i += 2) if (head[i] === 0) z++;
      return z;
    };
    const pairs = Math.floor(head.length / 2);
    if (pairs > 0 && Math.max(zerosAt(0), zerosAt(1)) >= 0.9 * pairs) {
      throw new QuadratInputError(`${path}: the file looks like UTF-16 text without a byte order mark (every other byte is zero); ${saveAs}`);
    }
    throw new QuadratInputError(`${path}: the file is binary, not CSV text (a zero byte at offset ${nul}); ${saveAs}`);
  }
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    let line = 1;
    let i = 0;
    // find the first byte that breaks UTF-8 for the message (most often Latin-1 accents)
    for (; i < bytes.length; i++) {
      if (bytes[i] === LF) line++;
      if (bytes[i] >= 0x80) {
        const len = bytes[i] >= 0xf0 ? 4 : bytes[i] >= 0xe0 ? 3 : bytes[i] >= 0xc0 ? 2 : 0;
        let ok = len > 0 && i + len <= bytes.length;
        for (let k = 1; ok && k < len; k++) ok = (bytes[i + k] & 0xc0) === 0x80;
        if (!ok) break;
        i += len - 1;
      }
    }
    const hex = i < bytes.length ? bytes[i].toString(16).toUpperCase().padStart(2, '0') : '??';
    throw new QuadratInputError(
      `${path}: the file is not UTF-8 text (byte 0x${hex} on line ${line}; Latin-1 or Windows-1252 encoding?); ${saveAs}`,
    );
  }
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
