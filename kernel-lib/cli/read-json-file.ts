import { readFileSync } from 'node:fs';
import { QuadratInputError } from '../model/errors';

/** Read and parse a JSON file named on the command line; errors name the option (`field`) and the file. */
export function readJsonFile(path: string, field: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch {
    throw new QuadratInputError(`${field}: cannot read file "${path}"`, { field });
  }
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new QuadratInputError(`${field}: "${path}" is not valid JSON (${(e as Error).message})`, { field });
  }
}
