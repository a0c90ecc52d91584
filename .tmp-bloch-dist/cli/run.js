/**
 * Shared CLI plumbing: run a command action, turning a user error into one
 * line on stderr and exit code 2, an internal failure into exit code 1.
 */
import { InputError } from '../errors.js';
export const EXIT_USER = 2;
export const EXIT_INTERNAL = 1;
export function action(fn) {
    return async (...args) => {
        try {
            await fn(...args);
        }
        catch (e) {
            reportAndExit(e);
        }
    };
}
export function reportAndExit(e) {
    if (e instanceof InputError) {
        process.stderr.write(`thinfoil: ${e.message}\n`);
        process.exit(EXIT_USER);
    }
    const msg = e instanceof Error ? e.message : String(e);
    process.stderr.write(`thinfoil: internal error: ${msg}\n`);
    if (process.env.THINFOIL_DEBUG && e instanceof Error)
        process.stderr.write(`${e.stack}\n`);
    process.exit(EXIT_INTERNAL);
}
/** Print a JSON object as one line on stdout. */
export function printJson(obj) {
    process.stdout.write(`${JSON.stringify(obj)}\n`);
}
/** Plain fixed-width text table. */
export function table(header, rows) {
    const w = header.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? '').length)));
    const line = (r) => r.map((c, i) => (c ?? '').padEnd(w[i])).join('  ').trimEnd();
    return [line(header), line(w.map((n) => '-'.repeat(n))), ...rows.map(line)].join('\n') + '\n';
}
/** Round to a number of significant digits for display. */
export function sig(x, digits = 4) {
    if (!Number.isFinite(x))
        return String(x);
    if (x === 0)
        return '0';
    return Number(x.toPrecision(digits)).toString();
}
