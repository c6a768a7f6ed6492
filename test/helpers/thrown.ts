import { ScienceError } from '../../src/errors.js';

/** The ScienceError `f` throws (another error is thrown on; a call that throws nothing fails the test). */
export function thrown(f: () => unknown): ScienceError {
  try {
    f();
  } catch (e) {
    if (e instanceof ScienceError) return e;
    throw e;
  }
  throw new Error('no ScienceError thrown');
}
