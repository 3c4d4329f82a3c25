import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readJsonFile } from '../../kernel-lib/cli/read-json-file';
import { inputError } from '../helpers/input-error';

const dir = mkdtempSync(join(tmpdir(), 'quadrat-json-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// Command-line input errors name the option and the file (DEVELOPERS.md, bad input).
describe('readJsonFile', () => {
  it('parses a JSON file', () => {
    const f = join(dir, 'model.json');
    writeFileSync(f, '{"response": "cover", "fixed": ["grazing"]}');
    expect(readJsonFile(f, '--model')).toEqual({ response: 'cover', fixed: ['grazing'] });
  });

  it('names the option and the file when it cannot be read or is not JSON', () => {
    const missing = inputError(() => readJsonFile(join(dir, 'nope.json'), '--model'));
    expect(missing.field).toBe('--model');
    expect(missing.message).toMatch(/^--model: cannot read file ".*nope\.json"$/);
    const bad = join(dir, 'bad.json');
    writeFileSync(bad, '{"response": "cover",}');
    const e = inputError(() => readJsonFile(bad, 'design'));
    expect(e.field).toBe('design');
    expect(e.message).toMatch(/^design: ".*bad\.json" is not valid JSON \(/);
    // a folder is not a file
    expect(inputError(() => readJsonFile(dir, '--model')).message).toMatch(/cannot read file/);
  });
});
