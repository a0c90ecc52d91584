/**
 * Shared CLI plumbing: run a command action, turning a user error into one
 * line on stderr and exit code 2, an internal failure into exit code 1.
 */
import { jsonText } from '../output/json.js';
import { InputError } from '../errors.js';

export const EXIT_USER = 2;
export const EXIT_INTERNAL = 1;

export function action<A extends unknown[]>(fn: (...args: A) => Promise<void> | void): (...args: A) => Promise<void> {
  return async (...args: A) => {
    try {
      await fn(...args);
    } catch (e) {
      reportAndExit(e);
    }
  };
}

export function reportAndExit(e: unknown): never {
  if (e instanceof InputError) {
    process.stderr.write(`thinfoil: ${e.message}\n`);
    process.exit(EXIT_USER);
  }
  const msg = e instanceof Error ? e.message : String(e);
  process.stderr.write(`thinfoil: internal error (a bug in thinfoil, not in your input; please report it with the command and its input files): ${msg}\n`);
  if (process.env.THINFOIL_DEBUG && e instanceof Error) process.stderr.write(`${e.stack}\n`);
  process.exit(EXIT_INTERNAL);
}

/** Print a JSON object as one line on stdout. */
export function printJson(obj: unknown): void {
  process.stdout.write(`${jsonText(obj)}\n`);
}

/** Plain fixed-width text table. */
export function table(header: readonly string[], rows: readonly (readonly string[])[]): string {
  const w = header.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? '').length)));
  const line = (r: readonly string[]) => r.map((c, i) => (c ?? '').padEnd(w[i])).join('  ').trimEnd();
  return [line(header), line(w.map((n) => '-'.repeat(n))), ...rows.map(line)].join('\n') + '\n';
}

export { sig } from '../format.js';
