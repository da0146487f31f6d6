/**
 * The last gate before a result is handed out: a run that broke down (NonFiniteError from the time loop or the
 * coefficient check, numerics/finite.ts) or a document with a NaN or ±Infinity anywhere becomes a
 * ComputationError — an input error with a message naming the cause, so the CLI and the web job report it
 * as "cannot be run as it stands" with that message, never as a verdict.
 */
import { InputError } from '../model/errors.ts';
import { checkFiniteResult, NON_FINITE_CODE, NON_FINITE_PREFIX } from '../numerics/finite.ts';

/** An evaluation whose numbers broke down; `problems[0].message` says where and why. */
export class ComputationError extends InputError {
  constructor(message: string) {
    super(NON_FINITE_CODE, [{ path: '', value: undefined, message }], message);
    this.name = 'ComputationError';
  }
}

/** True for a NonFiniteError, also one that crossed a worker thread (which keeps only the message). */
export function isNonFinite(e: unknown): e is Error {
  return e instanceof Error && ((e as { code?: string }).code === NON_FINITE_CODE || e.message.startsWith(NON_FINITE_PREFIX));
}

/**
 * Runs an evaluation and checks its document for non-finite numbers.
 * @throws ComputationError when a run broke down or the document has a non-finite number
 */
export async function finiteOrRefused<T>(evaluate: () => T | Promise<T>): Promise<T> {
  try {
    const doc = await evaluate();
    checkFiniteResult(doc);
    return doc;
  } catch (e) {
    if (e instanceof ComputationError) throw e;
    if (isNonFinite(e)) throw new ComputationError(e.message);
    throw e;
  }
}
