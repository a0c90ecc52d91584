/**
 * Runs a short Python program with Debian's reference libraries
 * (python3-gemmi, python3-numpy) and returns its JSON output.
 * When /usr/bin/python3 or a module is missing: under CI=true this throws
 * (the test fails); elsewhere it returns null and the caller skips with a message.
 */
import { spawnSync } from 'node:child_process';

export function runPython<T>(code: string, input: unknown): T | null {
  const r = spawnSync('/usr/bin/python3', ['-c', code], { input: JSON.stringify(input), encoding: 'utf8', timeout: 60_000 });
  const missing = r.error !== undefined || /ModuleNotFoundError|No module named/.test(r.stderr ?? '');
  if (missing) {
    const why = r.error ? String(r.error) : r.stderr;
    if (process.env.CI === 'true') throw new Error(`reference Python library missing in CI: ${why}`);
    return null;
  }
  if (r.status !== 0) throw new Error(`reference Python program failed: ${r.stderr}`);
  return JSON.parse(r.stdout) as T;
}

/** Memoised call, so several tests share one Python run. */
export function lazyPython<T>(code: string, input: unknown): () => T | null {
  let done = false;
  let value: T | null = null;
  return () => {
    if (!done) {
      value = runPython<T>(code, input);
      done = true;
    }
    return value;
  };
}
