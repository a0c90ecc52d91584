/**
 * An error the user can cause and fix (bad scenario, bad option, unknown
 * material ...). The message is one sentence naming the field and the fix.
 * The CLI prints it without a stack trace and exits with code 2.
 */
export class InputError extends Error {
  override readonly name = 'InputError';
  constructor(message: string) {
    super(message);
  }
}

/**
 * A broken internal invariant (arrays of the wrong size, unsorted records,
 * a non-finite intermediate ...): a bug in thinfoil, not the user's mistake.
 * The CLI reports it as an internal error with exit code 1 and asks for a bug report.
 */
export class InternalError extends Error {
  override readonly name = 'InternalError';
  constructor(message: string) {
    super(message);
  }
}
