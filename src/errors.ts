/**
 * An error the user can cause and fix (bad scenario, bad option, unknown
 * material ...). The message is one sentence naming the field and the fix.
 * The CLI prints it without a stack trace and exits with code 2.
 */
export class InputError extends Error {
  override readonly name = 'InputError';
  constructor(message: string) {
    super(oneShortLine(message));
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

/** Longest message kept whole; longer ones are cut (a refusal is one short line). */
const MAX_MESSAGE = 400;

/**
 * A message as one line that quotes user input only as short excerpts:
 * line breaks become spaces, quoted parts over 60 characters are shortened,
 * and the whole is cut at MAX_MESSAGE characters.
 */
function oneShortLine(message: string): string {
  let m = message.replace(/[\r\n\u2028\u2029]+/g, ' ').replace(/"([^"]*)"/g, (whole, q: string) => (q.length > 60 ? `"${excerpt(q)}"` : whole));
  if (m.length > MAX_MESSAGE) m = `${m.slice(0, MAX_MESSAGE - 40)} ... (message shortened)`;
  return m;
}

/**
 * A short excerpt of user input for an error message: at most `max`
 * characters (the start and the length when longer), control characters and
 * line breaks shown as spaces, so a message stays one short line.
 */
export function excerpt(text: string, max = 60): string {
  const flat = text.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029]/g, ' ');
  if (flat.length <= max) return flat;
  return `${flat.slice(0, Math.max(8, max - 20))}... (${text.length} characters)`;
}
