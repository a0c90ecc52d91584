/**
 * The one way tests call Debian's Python reference libraries
 * (/usr/bin/python3 with python3-gemmi, python3-scipy, python3-numpy,
 * python3-pil, python3-tifffile, python3-mpmath).
 *
 *   const py = needPython('gemmi');              // probed once per test file
 *   it('agrees with gemmi', (ctx) => {
 *     py.require(ctx);                            // first line of every such test
 *     const ref = pythonJson<number[]>(code, input);
 *     ...
 *   });
 *
 * When the interpreter or a module is missing:
 * - under CI=true, require() throws: the test fails and says which Debian
 *   package to install;
 * - elsewhere, require() calls ctx.skip(note): vitest reports the test as
 *   skipped (never as passed), and test/pythonSkipsReporter.ts ends the run with
 *   one line naming the Debian packages that would enable the skipped checks
 *   (it reads the skip notes, so it works with any pool, 'forks' included).
 *
 * THINFOIL_TEST_PYTHON=/some/path replaces /usr/bin/python3 (used to check the
 * skip and CI paths with THINFOIL_TEST_PYTHON=/nonexistent; see DEVELOPERS.md).
 */
import { spawnSync } from 'node:child_process';
import type { TestContext } from 'vitest';

export const PYTHON = process.env.THINFOIL_TEST_PYTHON || '/usr/bin/python3';
export const IN_CI = process.env.CI === 'true';

/** Skip notes start with this; the reporter collects the package names after it (up to ';'). */
export const SKIP_NOTE_PREFIX = 'needs Debian packages: ';

/** Debian package of a Python module (by its top-level name); the standard library is in python3. */
const DEBIAN_PACKAGE: Readonly<Record<string, string>> = {
  gemmi: 'python3-gemmi',
  scipy: 'python3-scipy',
  numpy: 'python3-numpy',
  PIL: 'python3-pil',
  tifffile: 'python3-tifffile',
  mpmath: 'python3-mpmath',
};

export function debianPackageOf(module: string): string {
  return DEBIAN_PACKAGE[module.split('.')[0]] ?? 'python3';
}

const PROBE = `import importlib, json, sys
bad = {}
for m in sys.argv[1:]:
    try:
        importlib.import_module(m)
    except Exception as e:
        bad[m] = type(e).__name__ + ": " + str(e)
print(json.dumps(bad))`;

/** module -> null when importable, else the reason (cached for the test file's process). */
const probed = new Map<string, string | null>();

function probe(modules: readonly string[]): void {
  const todo = modules.filter((m) => !probed.has(m));
  if (todo.length === 0) return;
  const r = spawnSync(PYTHON, ['-c', PROBE, ...todo], { encoding: 'utf8', timeout: 60_000 });
  if (r.error !== undefined || r.status !== 0) {
    const why = r.error !== undefined ? `${PYTHON} cannot be run (${r.error.message})` : `${PYTHON} failed: ${r.stderr.trim()}`;
    for (const m of todo) probed.set(m, why);
    return;
  }
  const bad = JSON.parse(r.stdout) as Record<string, string>;
  for (const m of todo) probed.set(m, bad[m] === undefined ? null : `${PYTHON} cannot import ${m} (${bad[m]})`);
}

/** What a group of tests needs from Python; see the file comment. */
export interface PythonNeed {
  /** Every module imports (and the extra check, if any, passed). */
  readonly ok: boolean;
  /** Debian packages that would make `ok` true (empty when ok). */
  readonly packages: readonly string[];
  /** Why not ok ('' when ok). */
  readonly reason: string;
  /** First call of a test that needs Python: fails under CI, skips elsewhere, returns when ok. */
  require(ctx: Pick<TestContext, 'skip'>): void;
}

export interface ExtraCheck {
  /** Python code that exits non-zero when the feature is missing. */
  readonly code: string;
  /** Debian packages that provide the feature. */
  readonly packages: readonly string[];
  /** What is missing, in words. */
  readonly what: string;
}

/** The modules (and optionally a feature check) a group of tests needs. */
export function needPython(...modules: string[]): PythonNeed {
  return need(modules, undefined);
}

/** As needPython, plus a feature check such as PIL's raqm text layout. */
export function needPythonFeature(modules: readonly string[], extra: ExtraCheck): PythonNeed {
  return need(modules, extra);
}

function need(modules: readonly string[], extra: ExtraCheck | undefined): PythonNeed {
  probe(modules);
  const missing = modules.filter((m) => probed.get(m) !== null);
  const reasons = missing.map((m) => probed.get(m) as string);
  const packages = new Set<string>();
  const runs = !(missing.length > 0 && /cannot be run/.test(reasons[0]));
  if (!runs) packages.add('python3');
  for (const m of missing) packages.add(debianPackageOf(m));
  if (missing.length === 0 && extra !== undefined) {
    const r = spawnSync(PYTHON, ['-c', extra.code], { encoding: 'utf8', timeout: 60_000 });
    if (r.error !== undefined || r.status !== 0) {
      for (const p of extra.packages) packages.add(p);
      reasons.push(`${extra.what} (${(r.stderr ?? '').trim().split('\n').pop() ?? ''})`);
    }
  }
  const pk = [...new Set(reasons)].join('; ');
  const list = [...packages];
  const ok = list.length === 0;
  return {
    ok,
    packages: list,
    reason: ok ? '' : pk,
    require(ctx) {
      if (ok) return;
      if (IN_CI) {
        throw new Error(`CI=true and the Python reference is missing: install Debian's ${list.join(', ')} (${pk})`);
      }
      ctx.skip(`${SKIP_NOTE_PREFIX}${list.join(', ')}; ${pk}`);
    },
  };
}

export interface PythonRun {
  readonly stdout: string;
  readonly stderr: string;
}

/**
 * Runs PYTHON with the arguments (a script path or '-c', code, ...), the
 * input on stdin (a string as is, anything else as JSON); throws with stderr
 * when it exits non-zero. Call only after need.require(ctx).
 */
export function runPython(args: readonly string[], input?: unknown): PythonRun {
  const stdin = input === undefined ? undefined : typeof input === 'string' ? input : JSON.stringify(input);
  const r = spawnSync(PYTHON, args, { input: stdin, encoding: 'utf8', maxBuffer: 256 << 20, timeout: 120_000 });
  if (r.error !== undefined) throw new Error(`${PYTHON} ${args[0]} could not run: ${r.error.message}`);
  if (r.status !== 0) throw new Error(`${PYTHON} ${args[0] === '-c' ? '-c <code>' : args[0]} failed (exit ${r.status}): ${r.stderr}`);
  return { stdout: r.stdout, stderr: r.stderr };
}

/** Runs Python code with `input` as JSON on stdin (and extra argv) and parses its stdout as JSON. */
export function pythonJson<T>(code: string, input: unknown = null, args: readonly string[] = []): T {
  return JSON.parse(runPython(['-c', code, ...args], input).stdout) as T;
}

/** Memoised value, so several tests share one Python run. */
export function once<T>(compute: () => T): () => T {
  let done = false;
  let value: T;
  return () => {
    if (!done) {
      value = compute();
      done = true;
    }
    return value;
  };
}

/** pythonJson run once, on the first call (after need.require(ctx)), shared by several tests. */
export function lazyPythonJson<T>(code: string, input: unknown = null): () => T {
  return once(() => pythonJson<T>(code, input));
}

/** runPython's stdout. */
export function pythonText(args: readonly string[], input?: unknown): string {
  return runPython(args, input).stdout;
}
