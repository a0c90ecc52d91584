/**
 * How the CLI reports failures (src/cli/run.ts): a user error is one line and
 * exit code 2; a broken internal invariant is exit code 1 with a request for a
 * bug report, never presented as the user's mistake.
 */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { reportAndExit, EXIT_INTERNAL, EXIT_USER } from '../../src/cli/run.js';
import { InputError, InternalError } from '../../src/errors.js';
import { prepareColumnSystem, integrateColumnN } from '../../src/dynamics/manyBeam.js';
import { systematicRowInput, systematicRowOrders } from '../../src/dynamics/manyBeamSystematicRow.js';

class Exited extends Error {
  constructor(readonly code: number | undefined) {
    super(`exit ${code}`);
  }
}

function report(e: unknown): { code: number | undefined; text: string } {
  let text = '';
  vi.spyOn(process.stderr, 'write').mockImplementation((s: string | Uint8Array) => {
    text += String(s);
    return true;
  });
  vi.spyOn(process, 'exit').mockImplementation((code?: string | number | null) => {
    throw new Exited(code === null || code === undefined ? undefined : Number(code));
  });
  try {
    reportAndExit(e);
  } catch (x) {
    if (x instanceof Exited) return { code: x.code, text };
    throw x;
  }
  return { code: undefined, text };
}

afterEach(() => vi.restoreAllMocks());

describe('reportAndExit', () => {
  it('a user error: its sentence and exit code 2', () => {
    const r = report(new InputError('foil.thickness_nm must be positive; give the thickness in nm.'));
    expect(r.code).toBe(EXIT_USER);
    expect(r.text).toBe('thinfoil: foil.thickness_nm must be positive; give the thickness in nm.\n');
  });

  it('an internal invariant: exit code 1, marked as a bug to report', () => {
    const r = report(new InternalError('faults must be sorted by increasing depth: sort them.'));
    expect(r.code).toBe(EXIT_INTERNAL);
    expect(r.text).toMatch(/^thinfoil: internal error \(a bug in thinfoil, not in your input; please report it/);
    expect(r.text.split('\n').filter((l) => l !== '')).toHaveLength(1);
  });

  it('a broken invariant in the many-beam engine is an InternalError, not an InputError', () => {
    const input = systematicRowInput({
      nMin: -1,
      nMax: 1,
      s_g: 0,
      lambda_nm: 0.0025079,
      g_per_nm: 5,
      potential: (m) => [0.05 / Math.abs(m), 0],
      absorption: (m) => [0.005 / (1 + Math.abs(m)), 0],
    });
    const sys = prepareColumnSystem(input, systematicRowOrders(-1, 1), { incident: 1 });
    const out = new Float64Array(6);
    let caught: unknown;
    try {
      integrateColumnN(out, sys, 50, () => 0, 1e-6, Float64Array.from([30, 1, 20, 1]));
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(InternalError);
    expect(caught).not.toBeInstanceOf(InputError);
    expect(report(caught).code).toBe(EXIT_INTERNAL);
  });
});
