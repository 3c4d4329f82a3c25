import { mkdtempSync, rmSync, writeFileSync } from 'fs';
import { tmpdir } from 'os';
import { join } from 'path';
import { afterAll, describe, expect, it } from 'vitest';
import { MISSING_MARKERS, parseCsv, readCsvFile } from '../../kernel-lib/data/csv';
import { inputError } from '../helpers/input-error';


describe('parseCsv: RFC 4180 quoting', () => {
  it('matches Python csv.reader on quoted delimiters, doubled quotes and quoted line breaks', () => {
    const text = 'site,note,count\r\nA,"wet, shaded",3\r\n"B","said ""hi""\r\nthen left",4\r\nC,,NA\r\n';
    // Reference: Python 3.11 csv.reader(io.StringIO(text, newline='')) gives
    // [['site','note','count'], ['A','wet, shaded','3'], ['B','said "hi"\r\nthen left','4'], ['C','','NA']];
    // our missing rule then maps '' and 'NA' to null, and "count" is numeric.
    expect(parseCsv(text)).toEqual({
      site: ['A', 'B', 'C'],
      note: ['wet, shaded', 'said "hi"\r\nthen left', null],
      count: [3, 4, null],
    });
  });

  it('reads the RFC 4180 section 2 examples (rules 5-7)', () => {
    // RFC 4180 §2 rule 6: fields with line breaks, double quotes and commas are enclosed in quotes;
    // rule 7: a double quote inside a quoted field is escaped by a preceding double quote.
    const text = 'a,b,c\n"aaa","b\nbb","ccc"\nzzz,yyy,xxx\n"aaa","b""bb","ccc"\n';
    expect(parseCsv(text)).toEqual({
      a: ['aaa', 'zzz', 'aaa'],
      b: ['b\nbb', 'yyy', 'b"bb'],
      c: ['ccc', 'xxx', 'ccc'],
    });
  });

  it('accepts a last record without line break (RFC 4180 §2 rule 2), LF, CR and CRLF endings', () => {
    // RFC 4180 §2 rule 2: the last record may or may not have an ending line break.
    expect(parseCsv('x,y\n1,2')).toEqual({ x: [1], y: [2] });
    expect(parseCsv('x,y\r1,2\r3,4\r')).toEqual({ x: [1, 3], y: [2, 4] });
    expect(parseCsv('x,y\r\n1,2\r\n')).toEqual({ x: [1], y: [2] });
  });
});

describe('parseCsv: values', () => {
  it('maps empty cells, NA and NaN to null, quoted or not', () => {
    // Project rule (kernel-lib/data/csv.ts); NA/NaN as missing markers is common practice, no source.
    expect(parseCsv('v,w\n1,a\nNA,NA\n"",""\nNaN, NA \n2,b\n')).toEqual({
      v: [1, null, null, null, 2],
      w: ['a', null, null, null, 'b'],
    });
  });

  it('parses a column as numbers when every non-missing cell is numeric, and keeps the odd cell of a mostly numeric column as text', () => {
    const cols = parseCsv('a,b,c,d,e\n1,1,-2.5e-3, 7 ,p\n.5,x,+3,8,q\n2.,3,1E2,,4\n');
    expect(cols.a).toEqual([1, 0.5, 2]);
    // mostly numbers: the numbers stay numbers so that a model using "b" stops on row 2 (data-build-design tests)
    expect(cols.b).toEqual([1, 'x', 3]);
    // mostly text: every cell stays text, exactly as written
    expect(cols.e).toEqual(['p', 'q', '4']);
    expect(cols.c).toEqual([-0.0025, 3, 100]);
    expect(cols.d).toEqual([7, 8, null]);
  });

  it('keeps text exactly, including spaces, a quoted comma and non-decimal number forms', () => {
    const cols = parseCsv('t\n wet \n0x10\nInfinity\n"1,5"\n');
    expect(cols.t).toEqual([' wet ', '0x10', 'Infinity', '1,5']);
  });

  it('gives an all-missing column as nulls', () => {
    expect(parseCsv('a,b\n1,\n2,NA\n').b).toEqual([null, null]);
  });

  it('skips blank lines and a byte order mark; keeps the header when there are no data rows', () => {
    expect(parseCsv('\ufeffx,y\n\n1,2\n\n3,4\n\n')).toEqual({ x: [1, 3], y: [2, 4] });
    expect(parseCsv('x,y\n')).toEqual({ x: [], y: [] });
  });

  it('takes another delimiter', () => {
    expect(parseCsv('x;y\n"1;2";3\n', { delimiter: ';' })).toEqual({ x: ['1;2'], y: [3] });
  });
});

describe('parseCsv: errors name the line', () => {
  it('a record with the wrong number of fields', () => {
    const e = inputError(() => parseCsv('a,b,c\n1,2,3\n4,5\n'));
    expect(e.message).toBe('line 3: expected 3 fields as in the header, got 2');
    expect(e.row).toBe(2);
  });

  it('counts line breaks inside quoted fields when naming a line', () => {
    const e = inputError(() => parseCsv('a,b\n"one\ntwo",1\n3,4,5\n'));
    expect(e.message).toBe('line 4: expected 2 fields as in the header, got 3');
  });

  it('an unclosed quote, text after a closing quote, bad header, bad delimiter', () => {
    expect(inputError(() => parseCsv('a,b\n1,"open\n2,3\n')).message).toBe('line 2: a quoted field is not closed');
    expect(inputError(() => parseCsv('a,b\n1,"x"y\n')).message).toBe(
      'line 2: unexpected text after a closing quote; a quote inside a quoted field is written ""',
    );
    expect(inputError(() => parseCsv('')).message).toBe('csv: no header row; the first line must name the columns');
    expect(inputError(() => parseCsv('a,,c\n1,2,3\n')).message).toBe('line 1: header field 2 is empty; every column needs a name');
    expect(inputError(() => parseCsv('a,b,a\n1,2,3\n')).message).toBe('line 1: duplicate column name "a" (fields 1 and 3)');
    expect(inputError(() => parseCsv('a\n1\n', { delimiter: '"' })).message).toMatch(/^csv delimiter: expected one character/);
  });
});

describe('readCsvFile', () => {
  const dir = mkdtempSync(join(tmpdir(), 'quadrat-csv-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('reads a file and names it in errors', () => {
    const good = join(dir, 'survey.csv');
    writeFileSync(good, 'site,cover\nA,0.5\nB,NA\n');
    expect(readCsvFile(good)).toEqual({ site: ['A', 'B'], cover: [0.5, null] });

    const bad = join(dir, 'bad.csv');
    writeFileSync(bad, 'site,cover\nA\n');
    expect(inputError(() => readCsvFile(bad)).message).toBe(`${bad} line 2: expected 2 fields as in the header, got 1`);

    const missing = join(dir, 'nope.csv');
    expect(inputError(() => readCsvFile(missing)).message).toBe(`${missing}: cannot read the file (ENOENT)`);
  });
});

describe('parseCsv: missing-value markers, decimal comma, other delimiters', () => {
  it('reads the documented markers as missing, and a list of your own instead', () => {
    // Project rule (MISSING_MARKERS); these markers are common practice, no source.
    expect(MISSING_MARKERS).toEqual(['NA', 'na', 'N/A', 'n/a', 'NaN', '.', '-']);
    expect(parseCsv('v\n1\nna\nn/a\nN/A\n.\n-\n 2 \n').v).toEqual([1, null, null, null, null, null, 2]);
    // own list: "-999" is missing, "NA" is then text (and the column mostly numbers keeps it as text)
    expect(parseCsv('v\n1\n-999\n3\nNA\n', { missing: ['-999'] }).v).toEqual([1, null, 3, 'NA']);
    // empty cells stay missing whatever the list
    expect(parseCsv('v,w\n1,\n2,3\n', { missing: [] }).w).toEqual([null, 3]);
    expect(inputError(() => parseCsv('v\n1\n', { missing: 'NA' as unknown as string[] })).field).toBe('missing');
  });

  it('reads decimal commas with decimal "," (delimiter then ";" by default)', () => {
    // European spreadsheet export convention: ";" between fields, "," as decimal mark (common practice, no source)
    expect(parseCsv('x;y\n0,5;2\n-1,25e1;3\n', { decimal: ',' })).toEqual({ x: [0.5, -12.5], y: [2, 3] });
    expect(inputError(() => parseCsv('x\n1\n', { decimal: ',', delimiter: ',' })).field).toBe('delimiter');
    expect(inputError(() => parseCsv('x\n1\n', { decimal: 'comma' })).field).toBe('decimal');
  });

  it('refuses a column of decimal-comma numbers read with decimal ".", naming column, line and fix', () => {
    const e = inputError(() => parseCsv('site\tcover\nA\t0,5\nB\t1\n', { delimiter: '\t' }));
    expect(e.message).toBe('column "cover": numbers are written with a decimal comma (line 2 has "0,5"); read the file with decimal "," (command line: --decimal ,)');
    expect(e.column).toBe('cover');
  });

  it('says when the header looks semicolon- or tab-separated', () => {
    const e = inputError(() => parseCsv('site;cover;year\nA;0,5;2021\n'));
    expect(e.message).toBe(
      'csv: the header is one field holding 2 semicolons: the file looks semicolon-separated; read it with delimiter ";" (command line: --delimiter ;, and --decimal , if numbers are written "0,5")',
    );
    expect(inputError(() => parseCsv('site\tcover\nA\t1\n')).message).toContain('looks tab-separated');
    // with the delimiter given, the same file reads
    expect(parseCsv('site;cover\nA;0,5\n', { delimiter: ';', decimal: ',' })).toEqual({ site: ['A'], cover: [0.5] });
  });
});

describe('readCsvFile: encodings and binary files', () => {
  const dir = mkdtempSync(join(tmpdir(), 'quadrat-enc-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  const file = (name: string, bytes: Buffer) => {
    const path = join(dir, name);
    writeFileSync(path, bytes);
    return path;
  };

  it('names UTF-16 (with and without byte order mark), zip spreadsheets, binary and Latin-1 files', () => {
    const text = 'site,cover\nA,1\n';
    // Buffer.from(.., 'utf16le') is Node's UTF-16LE encoder; FF FE is the UTF-16LE byte order mark (Unicode §23.8)
    const le = file('le.csv', Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(text, 'utf16le')]));
    expect(inputError(() => readCsvFile(le)).message).toBe(`${le}: the file is UTF-16 text (little-endian byte order mark); save it as CSV with UTF-8 encoding ("CSV UTF-8") and read that file`);
    expect(inputError(() => readCsvFile(file('nobom.csv', Buffer.from(text, 'utf16le')))).message).toContain('UTF-16 text without a byte order mark');
    // "PK\x03\x04": zip local file header signature (PKWARE APPNOTE §4.3.7), the container of .xlsx/.ods
    expect(inputError(() => readCsvFile(file('sheet.csv', Buffer.from([0x50, 0x4b, 3, 4, 20, 0, 0, 0])))).message).toContain('zip archive');
    expect(inputError(() => readCsvFile(file('bin.csv', Buffer.from([0x7f, 0x45, 0x4c, 0x46, 0, 1, 2])))).message).toContain('binary, not CSV text (a zero byte at offset 4)');
    // 0xE9 is "é" in Latin-1 (ISO 8859-1), invalid alone in UTF-8 (RFC 3629 §3)
    const latin = file('latin.csv', Buffer.from([...Buffer.from('site,cover\nA,1\nPr'), 0xe9, ...Buffer.from(',2\n')]));
    expect(inputError(() => readCsvFile(latin)).message).toBe(`${latin}: the file is not UTF-8 text (byte 0xE9 on line 3; Latin-1 or Windows-1252 encoding?); save it as CSV with UTF-8 encoding ("CSV UTF-8") and read that file`);
    // valid UTF-8 with accents still reads
    expect(readCsvFile(file('utf8.csv', Buffer.from('site,cover\nPré,1\n'))).site).toEqual(['Pré']);
  });
});
