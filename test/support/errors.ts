import { expect } from 'vitest';
import { UserError } from '../../src/config/errors.ts';

/** Run fn, which must throw a UserError, and return that error for its message to be checked. */
export function catchUserError(fn: () => unknown): UserError {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(UserError);
    return e as UserError;
  }
  throw new Error('expected a UserError');
}
