/**
 * Blind benchmark of `thinfoil identify` (compiled CLI, one process per case)
 * on micrographs made by scripts/blind_micrographs.py: an independent
 * generator (its own RK4 two-beam column integrator and Hirth & Lothe
 * isotropic field, checked in test/analysis/blindGenerator.test.ts) with
 * camera effects (blur, noise at SNR 2-8, gamma, gradient, 8 bits) and model
 * mismatch (thickness and depth +-15 %, w +-0.2, u off by 3 degrees). The
 * micrographs, scenarios and truth are committed in test/fixtures/blind/
 * (the test does not regenerate them). bench/blind.mjs runs the cases and
 * counts; the requirement (issue 14): top-1 >= 90 % over the cases whose
 * true b is in the candidate list, no wrong "identified" verdict, and no
 * case with the true b outside the list named as identified.
 *
 * Here: a fixed subset of three cases (two with b in the list, one with
 * b = a[0 1 0] outside it), chosen among those today's identify passes, so
 * that the test guards against regressions in a bounded time. The full
 * benchmark (36 cases, several minutes on 2 cores) is `npm run blind`, or
 * this file with THINFOIL_BLIND_FULL=1.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { join } from 'node:path';

const ROOT = join(import.meta.dirname, '..', '..');
const CLI = join(ROOT, 'dist', 'cli', 'main.js');
const RUNNER = join(ROOT, 'bench', 'blind.mjs');

interface BlindRun {
  results: { case: string; inList: boolean; top?: string; topCorrect?: boolean; decision?: string; wrongIdentified?: boolean; error?: string }[];
  summary: { cases: number; inList: number; top1Accuracy: number; wrongIdentified: number; outsideListNamed: number; errors: number; seconds: number };
  pass: boolean;
}

function blind(cases?: readonly string[]): BlindRun {
  if (!existsSync(CLI)) throw new Error('dist/cli/main.js is missing: run `npm run build` (npm test does it)');
  const args = [RUNNER, '--json', '--jobs', '2', ...(cases ? ['--cases', cases.join(',')] : [])];
  const r = spawnSync(process.execPath, args, { cwd: ROOT, encoding: 'utf8', timeout: 3_600_000 });
  if (r.status !== 0 && r.status !== 1) throw new Error(`bench/blind.mjs failed: ${r.stderr}`);
  return JSON.parse(r.stdout) as BlindRun;
}

function expectRequirement(run: BlindRun): void {
  const s = run.summary;
  // the numbers, for the log of the run
  process.stdout.write(
    `blind benchmark: ${s.cases} cases, top-1 ${(100 * s.top1Accuracy).toFixed(1)} % of ${s.inList}, wrong "identified" ${s.wrongIdentified}, ` +
      `outside the list named ${s.outsideListNamed}, errors ${s.errors}, ${s.seconds.toFixed(1)} s\n`,
  );
  expect(s.errors, JSON.stringify(run.results.filter((r) => r.error))).toBe(0);
  expect(s.top1Accuracy).toBeGreaterThanOrEqual(0.9);
  expect(s.wrongIdentified).toBe(0);
  expect(s.outsideListNamed).toBe(0);
  expect(run.pass).toBe(true);
}

describe('blind benchmark (test/fixtures/blind, scripts/blind_micrographs.py)', () => {
  it('subset case04, case08, case05: true b ranked first where it is a candidate, no wrong "identified", b outside the list not named but "no candidate explains"', () => {
    const run = blind(['case04', 'case08', 'case05']);
    expect(run.results.map((r) => r.case)).toEqual(['case04', 'case05', 'case08']);
    expect(run.results.filter((r) => !r.inList).length).toBe(1);
    expectRequirement(run);
    // the case whose b is outside the list is recognised as such (absolute fit: structured residual well above the noise)
    expect(run.results.find((r) => r.case === 'case05')?.decision).toBe('no candidate explains');
  });

  it.skipIf(!process.env.THINFOIL_BLIND_FULL)('all 36 cases: top-1 >= 90 %, no wrong "identified" (set THINFOIL_BLIND_FULL=1; several minutes)', () => {
    const run = blind();
    expect(run.summary.cases).toBeGreaterThanOrEqual(30);
    expectRequirement(run);
  }, 3_600_000);
});
