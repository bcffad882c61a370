import { expect } from 'vitest';
import { ImportError } from '../../shared/import/import-error.ts';

/** The ImportError `promise` rejects with; fails the test when it resolves or rejects with anything else. */
export async function rejection(promise: Promise<unknown>): Promise<ImportError> {
  try {
    await promise;
  } catch (error) {
    expect(error).toBeInstanceOf(ImportError);
    return error as ImportError;
  }
  throw new Error('expected an ImportError');
}
