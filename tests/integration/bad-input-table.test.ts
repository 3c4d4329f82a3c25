/**
 * Bad and awkward input, one row each: the command line (in process, through cli/main) or a
 * library call, the exit code expected (0 fine, 1 fitted with a reported problem or failed work,
 * 2 bad input), and what the message must name (field, column, row or value). Expected outcomes
 * are the project's rules (README "Bad input" and DEVELOPERS.md "Never throws for numerics");
 * each row was checked to fail when the behaviour it guards is removed.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../kernel-lib/cli/main';
import { QuadratInputError } from '../../kernel-lib/model/errors';
import { fitModel } from '../../kernel-lib/analyse/fit-model';
import { parseModel } from '../../kernel-lib/model/parse';
import { parseCsv } from '../../kernel-lib/data/csv';
import { parseDesign } from '../../kernel-lib/design/parse';
import { runStudy } from '../../kernel-lib/study/run-study';

const ROOT = join(__dirname, '..', '..');
const dir = mkdtempSync(join(tmpdir(), 'quadrat-table-'));
const f = (name: string) => join(dir, name);
const survey = readFileSync(join(ROOT, 'data', 'demo-survey.csv'), 'utf8');
const lines = survey.trimEnd().split('\n');
const header = lines[0].split(',');
const model = JSON.parse(readFileSync(join(ROOT, 'data', 'demo-model.json'), 'utf8'));
const study = JSON.parse(readFileSync(join(ROOT, 'data', 'demo-study.json'), 'utf8'));
const smallStudy = { ...study, replicates: 4, grid: undefined };

/** The survey with data row `row` (1-based) of `column` set to `value`. */
function withCell(column: string, row: number, value: string): string {
  const j = header.indexOf(column);
  return lines.map((l, i) => (i === row ? l.split(',').map((c, k) => (k === j ? value : c)).join(',') : l)).join('\n') + '\n';
}

beforeAll(() => {
  const write = (name: string, text: string | Buffer) => writeFileSync(f(name), text);
  write('good.csv', survey);
  write('model.json', JSON.stringify(model));
  write('study.json', JSON.stringify(smallStudy));
  write('cov-q.csv', withCell('soil_moisture', 6, '?'));
  write('cov-comma.csv', withCell('soil_moisture', 9, '"0,5"'));
  write('cov-text.csv', withCell('soil_moisture', 12, 'wet'));
  write('cov-na.csv', withCell('soil_moisture', 6, 'n/a'));
  write('cov-dash.csv', withCell('soil_moisture', 6, '-'));
  write('cov-999.csv', withCell('soil_moisture', 6, '-999x'));
  write('resp-q.csv', withCell('sedge_height', 6, '?'));
  write('resp-text.csv', withCell('sedge_height', 20, 'tall'));
  write('semicolon.csv', survey.replace(/,/g, ';'));
  write('semicolon-comma.csv', survey.replace(/,/g, ';').replace(/(\d)\.(\d)/g, '$1,$2'));
  write('tabs.csv', survey.replace(/,/g, '\t'));
  write('utf16.csv', Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(survey, 'utf16le')]));
  write('utf16-nobom.csv', Buffer.from(survey, 'utf16le'));
  write('zip.csv', Buffer.from([0x50, 0x4b, 3, 4, 10, 0, 0, 0, 8, 0]));
  write('xls.csv', Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]));
  write('binary.csv', Buffer.from([1, 2, 3, 0, 4, 5]));
  write('latin1.csv', Buffer.concat([Buffer.from(lines.slice(0, 3).join('\n') + '\n'), Buffer.from([0x50, 0x72, 0xe9]), Buffer.from(lines[3].slice(lines[3].indexOf(',')) + '\n')]));
  write('empty.csv', '');
  write('header-only.csv', `${lines[0]}\n`);
  write('dup-header.csv', survey.replace('visit', 'plot'));
  write('ragged.csv', `${lines.slice(0, 5).join('\n')}\nashpool,grazed\n`);
  write('unclosed.csv', `${lines[0]}\n"ashpool,grazed,2021,1,1,0.97,45.3\n`);
  // no grazed site surveyed in 2021: an empty cell of grazing × year
  write('no-cell.csv', lines.filter((l) => !l.includes(',grazed,2021,')).join('\n') + '\n');
  write('const.csv', lines.map((l, i) => (i === 0 ? l : l.replace(/,[^,]*$/, ',40'))).join('\n') + '\n');
  write('extreme.csv', lines.map((l, i) => (i === 0 || l.endsWith(',') ? l : l.replace(/,([^,]*)$/, (_m, v) => `,${v}e300`))).join('\n') + '\n');
  write('bigx.csv', lines.map((l, i) => { if (i === 0) return l; const c = l.split(','); c[5] = `${c[5]}e200`; return c.join(','); }).join('\n') + '\n');
  write('not-json.json', '{ "response": ');
  write('array.json', '[1, 2]');
  for (const [name, m] of Object.entries({
    'm-unknown': { ...model, colour: 'red' }, 'm-no-response': { ...model, response: undefined }, 'm-level': { ...model, level: 2 },
    'm-reml': { ...model, estimation: 'reml' }, 'm-interval': { ...model, interval: 'bayes' }, 'm-group-missing': { ...model, groups: [{ factor: 'transect', as: 'random' }] },
    'm-fixed-missing': { ...model, fixed: ['rainfall'] }, 'm-role': { ...model, groups: [{ factor: 'site', as: 'mixed' }] },
    'm-cat-response': { ...model, categorical: ['sedge_height'] }, 'm-missing-policy': { ...model, missing: 'ignore' },
    'm-kr-ml': { ...model, estimation: 'ML', interval: 'kenward-roger' }, 'm-fixed-string': { ...model, fixed: 'soil_moisture' },
    'm-empty-cell': { response: 'sedge_height', fixed: ['grazing', 'year', 'grazing:year'], categorical: ['year'], groups: [{ factor: 'site', as: 'random' }] },
  })) write(`${name}.json`, JSON.stringify(m));
  for (const [name, d] of Object.entries({
    's-levels': { ...smallStudy, factors: [{ name: 'site', levels: 1e9 }, ...study.factors.slice(1)] },
    's-rows': { ...smallStudy, perCell: 1e8 },
    's-no-truth': { ...smallStudy, truth: undefined },
    's-no-variants': { ...smallStudy, variants: [] },
    's-unknown': { ...smallStudy, colour: 'red' },
    's-replicates': { ...smallStudy, replicates: -3 },
    's-missing': { ...smallStudy, missing: 1.5 },
    's-grid': { ...smallStudy, grid: { 'factors.nothing.levels': [2] } },
    's-variant-interval': { ...smallStudy, variants: [{ name: 'v', model: { ...study.variants[0].model, interval: 'bayes' } }] },
    's-factor-levels': { ...smallStudy, factors: [{ name: 'site', levels: 0 }] },
  })) write(`${name}.json`, JSON.stringify(d));
  write('a-file', 'not a folder');
  mkdirSync(f('not-a-study'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Run the command line in this process; exit code and everything printed. */
async function cli(argv: string[]): Promise<{ code: number; out: string }> {
  let out = '';
  const o = process.stdout.write.bind(process.stdout);
  const e = process.stderr.write.bind(process.stderr);
  process.stdout.write = ((s: string) => { out += s; return true; }) as typeof process.stdout.write;
  process.stderr.write = ((s: string) => { out += s; return true; }) as typeof process.stderr.write;
  try {
    return { code: await main(argv), out };
  } finally {
    process.stdout.write = o;
    process.stderr.write = e;
  }
}

type CliRow = [label: string, argv: () => string[], exit: number, names: string];
const fit = (data: string, m = 'model.json', ...more: string[]) => () => ['fit', '--data', f(data), '--model', f(m), ...more];
const run = (design: string, ...more: string[]) => () => ['study', 'run', f(design), '--out', f(`out-${design}-${more.join('_').replace(/[^\w]/g, '')}`), '--workers', '1', ...more];

const CLI_ROWS: CliRow[] = [
  // CSV cells (item 1): the first offending row and value, and the fix
  ['one "?" in a numeric covariate', fit('cov-q.csv'), 2, 'column "soil_moisture": mixes numbers (row 1) and text (row 6 is "?")'],
  ['the "?" row names the fix', fit('cov-q.csv'), 2, 'add it to the missing-value markers'],
  ['a decimal comma in one cell', fit('cov-comma.csv'), 2, 'row 9 is "0,5"); "0,5" looks like a decimal comma'],
  ['a word in a numeric covariate', fit('cov-text.csv'), 2, 'row 12 is "wet"'],
  ['"n/a" is a documented missing marker', fit('cov-na.csv'), 0, 'dropped 5 rows'],
  ['"-" is a documented missing marker', fit('cov-dash.csv'), 0, 'dropped 5 rows'],
  ['--missing adds your own marker', fit('cov-999.csv', 'model.json', '--missing', '-999x'), 0, 'dropped 5 rows'],
  ['without it the marker is named', fit('cov-999.csv'), 2, 'row 6 is "-999x"'],
  ['"?" in the response names row 6', fit('resp-q.csv'), 2, 'response column "sedge_height": expected numbers, row 6 has "?"'],
  ['a word in the response', fit('resp-text.csv'), 2, 'row 20 has "tall"'],
  // delimiters, decimals, encodings (item 10)
  ['semicolon file', fit('semicolon.csv'), 2, 'looks semicolon-separated'],
  ['semicolon file read with --delimiter', fit('semicolon.csv', 'model.json', '--delimiter', ';'), 0, 'Effects with 95% intervals'],
  ['semicolon + decimal comma without --decimal', fit('semicolon-comma.csv', 'model.json', '--delimiter', ';'), 2, 'decimal comma'],
  ['semicolon + decimal comma with --decimal', fit('semicolon-comma.csv', 'model.json', '--decimal', ','), 0, 'Effects with 95% intervals'],
  ['tab file', fit('tabs.csv'), 2, 'looks tab-separated'],
  ['tab file with --delimiter tab', fit('tabs.csv', 'model.json', '--delimiter', 'tab'), 0, 'Effects with 95% intervals'],
  ['UTF-16 with byte order mark', fit('utf16.csv'), 2, 'UTF-16 text (little-endian byte order mark)'],
  ['UTF-16 without byte order mark', fit('utf16-nobom.csv'), 2, 'UTF-16 text without a byte order mark'],
  ['a zip spreadsheet', fit('zip.csv'), 2, 'zip archive'],
  ['an old .xls', fit('xls.csv'), 2, 'old-style Office document'],
  ['a binary file', fit('binary.csv'), 2, 'binary, not CSV text'],
  ['Latin-1 text', fit('latin1.csv'), 2, 'not UTF-8 text (byte 0xE9 on line 4'],
  ['--delimiter of two characters', fit('good.csv', 'model.json', '--delimiter', ';;'), 2, '--delimiter'],
  ['--decimal x', fit('good.csv', 'model.json', '--decimal', 'x'), 2, '--decimal'],
  ['--delimiter equal to --decimal', fit('good.csv', 'model.json', '--delimiter', ',', '--decimal', ','), 2, '--delimiter'],
  // CSV structure
  ['an empty file', fit('empty.csv'), 2, 'no header row'],
  ['a header only', fit('header-only.csv'), 2, 'no rows'],
  ['a duplicated column name', fit('dup-header.csv'), 2, 'duplicate column name "plot"'],
  ['a short record', fit('ragged.csv'), 2, 'line 6: expected 7 fields'],
  ['an unclosed quote', fit('unclosed.csv'), 2, 'line 2: a quoted field is not closed'],
  ['a data file that does not exist', fit('nope.csv'), 2, 'cannot read the file (ENOENT)'],
  // model JSON
  ['a model file that does not exist', fit('good.csv', 'nope.json'), 2, '--model'],
  ['a model file that is not JSON', fit('good.csv', 'not-json.json'), 2, 'not valid JSON'],
  ['a model file holding an array', fit('good.csv', 'array.json'), 2, 'one JSON object'],
  ['an unknown model key', fit('good.csv', 'm-unknown.json'), 2, 'unknown key "colour"'],
  ['no response', fit('good.csv', 'm-no-response.json'), 2, 'model.response'],
  ['level 2 in the model', fit('good.csv', 'm-level.json'), 2, 'model.level: expected a number strictly between 0 and 1'],
  ['estimation "reml" in the model', fit('good.csv', 'm-reml.json'), 2, 'model.estimation: expected "REML" or "ML", got "reml"'],
  ['an unknown interval method', fit('good.csv', 'm-interval.json'), 2, 'model.interval'],
  ['a grouping column not in the data', fit('good.csv', 'm-group-missing.json'), 2, 'column "transect" not found'],
  ['a fixed column not in the data', fit('good.csv', 'm-fixed-missing.json'), 2, 'column "rainfall" not found'],
  ['an unknown group role', fit('good.csv', 'm-role.json'), 2, 'model.groups[0].as'],
  ['a categorical response', fit('good.csv', 'm-cat-response.json'), 2, 'model.categorical[0]'],
  ['an unknown missing policy', fit('good.csv', 'm-missing-policy.json'), 2, 'model.missing'],
  ['Kenward-Roger with ML', fit('good.csv', 'm-kr-ml.json'), 2, 'kenward-roger'],
  ['fixed as a string', fit('good.csv', 'm-fixed-string.json'), 2, 'model.fixed'],
  // command-line values
  ['--level 2', fit('good.csv', 'model.json', '--level', '2'), 2, '--level: expected a number strictly between 0 and 1'],
  ['--level abc', fit('good.csv', 'model.json', '--level', 'abc'), 2, '--level'],
  ['--level -0.5', fit('good.csv', 'model.json', '--level', '-0.5'), 2, '--level'],
  ['--ci bayes', fit('good.csv', 'model.json', '--ci', 'bayes'), 2, 'bayes'],
  ['no --data', () => ['fit', '--model', f('model.json')], 2, '--data is required'],
  ['no --model', () => ['fit', '--data', f('good.csv')], 2, '--model is required'],
  ['an unknown option', () => ['fit', '--data', f('good.csv'), '--model', f('model.json'), '--colour', 'red'], 2, '--colour'],
  ['an unknown command', () => ['fitt'], 2, 'fitt'],
  // numerics reported, never silent (items 2, 3, 5, 9)
  ['a constant response', fit('const.csv'), 1, 'the response is constant (every value is 40)'],
  ['responses ×1e300 are fitted', fit('extreme.csv'), 0, 'Effects with 95% intervals'],
  ['a covariate ×1e200 overflows, named', fit('bigx.csv'), 1, 'values overflow: column soil_moisture'],
  ['an empty interaction cell is named', fit('no-cell.csv', 'm-empty-cell.json'), 0, 'an empty cell of the interaction grazing:year'],
  // study run (items 4, 8)
  ['study run without --out', () => ['study', 'run', f('study.json')], 2, '--out'],
  ['study run without a design', () => ['study', 'run', '--out', f('x')], 2, 'expected one design file'],
  ['a design file that does not exist', run('nope.json'), 2, 'cannot read'],
  ['a design that is not JSON', run('not-json.json'), 2, 'not valid JSON'],
  ['--workers -1', run('study.json', '--workers', '-1'), 2, '--workers: expected a whole number ≥ 1, got "-1"'],
  ['--workers 0', run('study.json', '--workers', '0'), 2, '--workers'],
  ['--workers abc', run('study.json', '--workers', 'abc'), 2, '--workers'],
  ['--workers 1.5', run('study.json', '--workers', '1.5'), 2, '--workers'],
  ['--replicates 0', run('study.json', '--replicates', '0'), 2, '--replicates'],
  ['--replicates -5', run('study.json', '--replicates', '-5'), 2, '--replicates: expected a whole number ≥ 1, got "-5"'],
  ['--replicates 2.5', run('study.json', '--replicates', '2.5'), 2, '--replicates'],
  ['--shard 5/3', run('study.json', '--shard', '5/3'), 2, '--shard: expected "i/N"'],
  ['--shard 0/2', run('study.json', '--shard', '0/2'), 2, '--shard'],
  ['--shard abc', run('study.json', '--shard', 'abc'), 2, '--shard'],
  ['--shard 1/0', run('study.json', '--shard', '1/0'), 2, '--shard'],
  ['--out under /proc', () => ['study', 'run', f('study.json'), '--out', '/proc/quadrat-study', '--workers', '1'], 2, '--out: cannot write the study to "/proc/quadrat-study"'],
  ['--out is a file', () => ['study', 'run', f('study.json'), '--out', f('a-file'), '--workers', '1'], 2, '--out: cannot write the study'],
  ['a factor of 1e9 levels', run('s-levels.json'), 2, 'design.factors[0].levels: factor "site" would have 1,000,000,000 levels'],
  ['a survey of too many rows', run('s-rows.json'), 2, 'beyond the limit of 10,000,000'],
  ['a design without truth', run('s-no-truth.json'), 2, 'design.truth'],
  ['a design without variants', run('s-no-variants.json'), 2, 'design.variants'],
  ['an unknown design key', run('s-unknown.json'), 2, 'colour'],
  ['negative replicates in the design', run('s-replicates.json'), 2, 'design.replicates'],
  ['a missing share of 1.5', run('s-missing.json'), 2, 'design.missing'],
  ['a grid path to nothing', run('s-grid.json'), 2, 'design.grid'],
  ['an unknown interval method in a variant', run('s-variant-interval.json'), 2, 'design.variants[0].model.interval'],
  ['a factor of 0 levels', run('s-factor-levels.json'), 2, 'design.factors[0].levels'],
  // other study commands
  ['study summary without a folder', () => ['study', 'summary'], 2, 'expected one study folder'],
  ['study summary of a folder that is not a study', () => ['study', 'summary', f('not-a-study')], 2, 'no metrics'],
  ['study merge without --out', () => ['study', 'merge', f('not-a-study')], 2, '--out'],
  ['study merge of a folder that is not a study', () => ['study', 'merge', f('not-a-study'), '--out', f('merged')], 2, 'not a study folder'],
  ['study report without metrics', () => ['study', 'report', f('not-a-study')], 2, 'no metrics'],
  ['an unknown study subcommand', () => ['study', 'walk'], 2, 'expected "run"'],
];

describe('bad input on the command line: exit code and what the message names', () => {
  it.each(CLI_ROWS.map((r, i) => [i + 1, ...r] as const))('%i %s', async (_i, _label, argv, exit, names) => {
    const r = await cli(argv());
    expect(r.out).toContain(names);
    expect(r.code).toBe(exit);
  }, 60_000);
});

type LibRow = [label: string, call: () => unknown, field: string, names: string];
const records = parseCsv(survey);
const studyOut = () => f(`lib-${Math.random().toString(36).slice(2)}`);

const LIB_ROWS: LibRow[] = [
  ['fitModel level 2', () => fitModel(records, model, { level: 2 }), 'options.level', 'strictly between 0 and 1'],
  ['fitModel level 0', () => fitModel(records, model, { level: 0 }), 'options.level', 'got 0'],
  ['fitModel level NaN', () => fitModel(records, model, { level: NaN }), 'options.level', 'got NaN'],
  ['fitModel estimation "reml"', () => fitModel(records, model, { estimation: 'reml' as 'REML' }), 'options.estimation', 'got "reml"'],
  ['fitModel interval "Wald"', () => fitModel(records, model, { interval: 'Wald' as 'wald' }), 'options.interval', '"Wald" is not available'],
  ['fitModel start with NaN', () => fitModel(records, model, { start: [NaN, 1, 1] }), 'options.start[0]', 'finite number'],
  ['fitModel bootstrap resamples 0', () => fitModel(records, model, { interval: 'bootstrap', bootstrap: { resamples: 0 } }), 'options.bootstrap.resamples', 'whole number'],
  ['fitModel with a model level 2', () => fitModel(records, { ...model, level: 2 }), 'model.level', 'strictly between 0 and 1'],
  ['fitModel with records not an array', () => fitModel(42 as never, model), '', 'data'],
  ['fitModel with a column of another length', () => fitModel({ ...records, site: ['a'] }, model), '', 'column "site"'],
  ['parseModel of a number', () => parseModel(3), 'model', 'expected an object'],
  ['parseModel with response ""', () => parseModel({ response: '' }), 'model.response', 'column name'],
  ['parseModel with groups not an array', () => parseModel({ response: 'y', groups: {} }), 'model.groups', 'expected an array'],
  ['parseModel with a slope on a factor', () => parseModel({ response: 'y', groups: [{ factor: 'site', as: 'random', slopes: ['site'] }] }), 'model.groups[0].slopes[0]', 'site'],
  ['parseCsv delimiter of two characters', () => parseCsv('a\n1\n', { delimiter: ';;' }), 'delimiter', 'one character'],
  ['parseCsv decimal "x"', () => parseCsv('a\n1\n', { decimal: 'x' }), 'decimal', '"." or ","'],
  ['parseCsv missing not a list', () => parseCsv('a\n1\n', { missing: 'NA' as never }), 'missing', 'list of texts'],
  ['parseCsv a decimal-comma column', () => parseCsv('a;b\n1;0,5\n', { delimiter: ';' }), '', 'column "b": numbers are written with a decimal comma'],
  ['parseCsv a semicolon header', () => parseCsv('a;b\n1;2\n'), 'delimiter', 'semicolon-separated'],
  ['parseDesign levels 1e9', () => parseDesign({ ...smallStudy, factors: [{ name: 'site', levels: 1e9 }] }), 'design.factors[0].levels', 'would need about'],
  ['parseDesign perCell 0', () => parseDesign({ ...smallStudy, perCell: 0 }), 'design.perCell', 'whole number'],
  ['parseDesign seed an object', () => parseDesign({ ...smallStudy, seed: {} }), 'design.seed', 'design.seed'],
];

describe('bad input through the library: a QuadratInputError naming the field', () => {
  it.each(LIB_ROWS.map((r, i) => [i + 1, ...r] as const))('%i %s', (_i, _label, call, field, names) => {
    let caught: unknown;
    try {
      call();
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(QuadratInputError);
    const err = caught as QuadratInputError;
    expect(err.message).toContain(names);
    if (field) expect(err.field).toBe(field);
  });
});

type StudyRow = [label: string, options: () => Record<string, unknown>, field: string, names: string];
const STUDY_ROWS: StudyRow[] = [
  ['shard index beyond the count', () => ({ out: studyOut(), shard: { index: 5, count: 3 } }), 'options.shard.index', 'from 1 to 3, got 5'],
  ['shard count 0', () => ({ out: studyOut(), shard: { index: 1, count: 0 } }), 'options.shard.count', 'got 0'],
  ['shard not an object', () => ({ out: studyOut(), shard: '1/2' }), 'options.shard', 'index, count'],
  ['batchSize -1', () => ({ out: studyOut(), batchSize: -1 }), 'options.batchSize', 'got -1'],
  ['batchSize 0', () => ({ out: studyOut(), batchSize: 0 }), 'options.batchSize', 'got 0'],
  ['batchSize 2.5', () => ({ out: studyOut(), batchSize: 2.5 }), 'options.batchSize', 'got 2.5'],
  ['workers 0', () => ({ out: studyOut(), workers: 0 }), 'options.workers', 'got 0'],
  ['workers -2', () => ({ out: studyOut(), workers: -2 }), 'options.workers', 'got -2'],
  ['replicates 0', () => ({ out: studyOut(), replicates: 0 }), 'options.replicates', 'got 0'],
  ['out missing', () => ({}), 'options.out', 'path of the study folder'],
  ['out empty', () => ({ out: '' }), 'options.out', 'got ""'],
  ['out under /proc', () => ({ out: '/proc/quadrat-lib', workers: 1 }), '--out', 'system file system'],
  ['onProgress not a function', () => ({ out: studyOut(), onProgress: 'yes' }), 'options.onProgress', 'function'],
];

describe('runStudy options: refused before anything runs', () => {
  it.each(STUDY_ROWS.map((r, i) => [i + 1, ...r] as const))('%i %s', async (_i, _label, options, field, names) => {
    const err = await runStudy(smallStudy, options() as never).then(() => null, (e: unknown) => e);
    expect(err).toBeInstanceOf(QuadratInputError);
    expect((err as QuadratInputError).message).toContain(names);
    expect((err as QuadratInputError).field).toBe(field);
  });
});

it('the table has at least 100 rows', () => {
  expect(CLI_ROWS.length + LIB_ROWS.length + STUDY_ROWS.length).toBeGreaterThanOrEqual(100);
});
