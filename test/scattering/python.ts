/**
 * Runs /usr/bin/python3 (Debian's python3-gemmi, python3-scipy) from a test
 * and returns its JSON output. When the interpreter or a module is missing:
 * under CI=true the caller must fail; otherwise it may skip with a message.
 */
import { spawnSync } from 'node:child_process';

export const PYTHON = '/usr/bin/python3';
export const IN_CI = process.env.CI === 'true';

/** Null when `import <module>` works, else the reason it does not. */
export function pythonModuleMissing(module: string): string | null {
  const r = spawnSync(PYTHON, ['-c', `import ${module}`], { encoding: 'utf8' });
  if (r.error) return `${PYTHON} cannot be run (${r.error.message})`;
  if (r.status !== 0) return `${PYTHON} cannot import ${module} (install Debian's python3-${module})`;
  return null;
}

/** Runs a Python script with `input` (JSON) on stdin and parses its stdout as JSON. */
export function runPythonJson<T>(script: string, input: unknown = null): T {
  const r = spawnSync(PYTHON, ['-c', script], { input: JSON.stringify(input), encoding: 'utf8', maxBuffer: 64 << 20 });
  if (r.error) throw r.error;
  if (r.status !== 0) throw new Error(`python reference script failed: ${r.stderr}`);
  return JSON.parse(r.stdout) as T;
}

/**
 * True when the suite should run; false (with a printed note) when the module
 * is missing outside CI. Under CI a missing module is a failure: the suite runs
 * and its first test throws.
 */
export function shouldRunWith(module: string): { run: boolean; missing: string | null } {
  const missing = pythonModuleMissing(module);
  if (missing && !IN_CI) {
    console.warn(`skipping tests that need ${module}: ${missing}`);
    return { run: false, missing };
  }
  return { run: true, missing };
}
