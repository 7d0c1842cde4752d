/**
 * Turning a thrown error into a cell error: bad input (InputError) shows as #VALUE! with the reason
 * in words, anything else as #N/A. Outside Excel (tests, Node) the error is thrown as it is.
 */
/* eslint-disable @typescript-eslint/no-explicit-any */
import { InputError } from '../../src/errors.js';

declare const CustomFunctions: {
  associate(id: string, fn: (...args: any[]) => unknown): void;
  Error: new (code: string, message?: string) => Error;
  ErrorCode: { invalidValue: string; notAvailable: string };
};

export function cellError(e: unknown): Error {
  const message = e instanceof Error ? e.message : String(e);
  if (typeof CustomFunctions === 'undefined') return e instanceof Error ? e : new Error(message);
  const code = e instanceof InputError ? CustomFunctions.ErrorCode.invalidValue : CustomFunctions.ErrorCode.notAvailable;
  // Excel shows at most 255 characters of the message
  return new CustomFunctions.Error(code, message.length > 255 ? `${message.slice(0, 254)}…` : message);
}

export function guarded<T>(work: () => T): T {
  try {
    return work();
  } catch (e) {
    throw cellError(e);
  }
}

export async function guardedAsync<T>(work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (e) {
    throw cellError(e);
  }
}

/** Ties a metadata id to its function when Office.js provides CustomFunctions (the shared runtime). */
export function associate(id: string, fn: (...args: any[]) => unknown): void {
  if (typeof CustomFunctions !== 'undefined') CustomFunctions.associate(id, fn);
}
