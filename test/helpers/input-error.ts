import { expect } from 'vitest';
import { InputError } from '../../src/errors.js';

/** The InputError a promise rejects with; fails the test if it resolves or rejects with anything else. */
export async function failure(p: Promise<unknown>): Promise<InputError> {
  try {
    await p;
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as InputError;
  }
  throw new Error('expected an InputError');
}

/** The InputError (or subclass T) a call throws; fails the test if it returns or throws anything else. */
export function thrown<T extends InputError = InputError>(f: () => unknown): T {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as T;
  }
  throw new Error('expected an InputError');
}
