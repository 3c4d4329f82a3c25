import { expect } from 'vitest';
import { QuadratInputError } from '../../kernel-lib/model/errors';

/** Run fn, expect it to throw a QuadratInputError, and return the error for checks on its message and fields. */
export function inputError(fn: () => unknown): QuadratInputError {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(QuadratInputError);
    return e as QuadratInputError;
  }
  throw new Error('expected a QuadratInputError, nothing was thrown');
}
