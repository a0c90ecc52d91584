/**
 * plan and measure end to end through the compiled CLI (`npm test` builds dist/ first).
 * Plumbing checks: the numbers behind them are tested in test/planning/.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const ROOT = join(import.meta.dirname, '..', '..');
const CLI = join(ROOT, 'dist', 'cli', 'main.js');
const run = (...args: string[]) => {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd: ROOT, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
};

describe('thinfoil plan', () => {
  it('plans the example scenario with a +-30 degree double tilt: a complete set, figure and JSON written', () => {
    const out = mkdtempSync(join(tmpdir(), 'thinfoil-plan-'));
    const r = run('plan', 'scenarios/copper-plan.json', '--out', out, '--json');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.complete).toBe(true);
    expect(j.candidates.length).toBe(12);
    expect(j.steps.length).toBeGreaterThan(0);
    for (const s of j.steps) {
      expect(Math.abs(s.tilts_deg[0])).toBeLessThanOrEqual(30);
      expect(Math.abs(s.tilts_deg[1])).toBeLessThanOrEqual(30);
    }
    for (const f of ['plan.png', 'plan.svg', 'plan.json']) expect(existsSync(join(out, f))).toBe(true);
    expect(existsSync(join(out, '.thinfoil-output')), 'the output-set marker').toBe(true);
    expect(readFileSync(join(out, 'plan.png')).subarray(1, 4).toString()).toBe('PNG');
    // the table form
    const t = run('plan', 'scenarios/copper-plan.json', '--out', out, '--holder', 'rotation', '--primary', '-25,25');
    expect(t.code, t.err).toBe(0);
    expect(t.out).toMatch(/in the order of least tilting/);
  });

  it('writes one output set: a folder holding a file thinfoil did not write is refused before any planning, nothing in it changes', () => {
    const out = mkdtempSync(join(tmpdir(), 'thinfoil-plan-'));
    writeFileSync(join(out, 'notes.txt'), 'mine');
    const r = run('plan', 'scenarios/copper-plan.json', '--out', out);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--out: .*notes\.txt/);
    expect(readdirSync(out)).toEqual(['notes.txt']);
  });

  it.each([
    [['plan', 'scenarios/copper-plan.json', '--holder', 'triple'], /--holder/],
    [['plan', 'scenarios/copper-plan.json', '--primary', '30,-30'], /--primary/],
    [['plan', 'scenarios/copper-plan.json', '--g-max', '0.6'], /no reflection/],
    [['plan', 'scenarios/copper-plan.json', '--tilts', '40,0'], /--tilts/],
    [['plan', 'scenarios/copper-faults.json', '--defect', '0'], /dislocation/],
  ])('bad input %j: exit code 2, one sentence', (args, pattern) => {
    const r = run(...(args as string[]));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(pattern);
    expect(r.err).not.toMatch(/\n\s+at /);
  });
});

describe('thinfoil measure', () => {
  it('gives s, w, thickness and xi_g as JSON', () => {
    const r = run('measure', 'Cu', '--g', '2,0,0', '--spacing', '12', '--kikuchi', '1.2', '--error', '0.2', '--fringes', '2.1,3.4,4.5,5.6', '--json');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.deviation.s_per_nm).toBeCloseTo(7.676e-3, 5); // worked by hand in test/planning/measurements.test.ts
    expect(j.deviation.sError_per_nm).toBeCloseTo(7.676e-3 / 6, 5);
    expect(j.convergentBeam.thickness_nm).toBeGreaterThan(0);
  });
  it.each([
    [['measure', 'Cu'], /nothing to measure/],
    [['measure', 'Cu', '--kikuchi', '1'], /--g/],
    [['measure', 'Cu', '--g', '2,0,0', '--spacing', '10', '--fringes', '1,2'], /at least 3/],
    [['measure', 'Cu', '--fault-width', '50', '--plane', '1,1,1'], /--normal/],
  ])('bad input %j: exit code 2', (args, pattern) => {
    const r = run(...(args as string[]));
    expect(r.code).toBe(2);
    expect(r.err).toMatch(pattern);
    expect(r.err).not.toMatch(/\n\s+at /);
  });
});
