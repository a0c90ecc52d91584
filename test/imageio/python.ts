/**
 * Running Debian's /usr/bin/python3 (python3-pil, python3-numpy) from tests as
 * an independent reader/writer of image files. When the modules are missing
 * the tests that need them skip with a message, except under CI=true where
 * their absence is a failure.
 */
import { spawnSync } from 'node:child_process';

export const PYTHON = '/usr/bin/python3';
export const IN_CI = process.env.CI === 'true';

export function pythonHas(modules: readonly string[]): boolean {
  const r = spawnSync(PYTHON, ['-c', modules.map((m) => `import ${m}`).join('; ')], { encoding: 'utf8' });
  return r.status === 0;
}

/** Run a script (file path or `-c` code); throws with stderr on failure. */
export function runPythonFull(args: readonly string[], input?: string): { stdout: string; stderr: string } {
  const r = spawnSync(PYTHON, args, { encoding: 'utf8', input, maxBuffer: 256 * 1024 * 1024 });
  if (r.status !== 0) throw new Error(`python3 ${args[0]} failed (${r.status}): ${r.stderr}`);
  return { stdout: r.stdout, stderr: r.stderr };
}

/** Run a script (file path or `-c` code) and return stdout; throws with stderr on failure. */
export function runPython(args: readonly string[], input?: string): string {
  return runPythonFull(args, input).stdout;
}

export const MISSING_PIL = 'Debian python3-pil / python3-numpy not found at /usr/bin/python3';
