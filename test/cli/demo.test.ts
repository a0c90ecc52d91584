/**
 * `thinfoil demo` end to end through the compiled CLI (`npm test` builds dist/ first).
 * Its own file: the demo is the longest single test of the CLI, and vitest balances files, not tests,
 * across its workers.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const ROOT = join(import.meta.dirname, '..', '..');
const CLI = join(ROOT, 'dist', 'cli', 'main.js');
const run = (...args: string[]) => {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd: ROOT, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
};

describe('thinfoil demo', () => {
  it('renders the invented demo, says it is invented, and writes images and tables', () => {
    const out = mkdtempSync(join(tmpdir(), 'thinfoil-demo-'));
    // --size 64 keeps the test short (same scenario, same field of view, coarser pixels); every check stays
    const r = run('demo', '--out', out, '--size', '64');
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/invented/);
    expect(r.out).toMatch(/64 x 64 px at 2 nm/);
    const summary = JSON.parse(readFileSync(join(out, 'render.json'), 'utf8'));
    expect(summary.images.length).toBeGreaterThanOrEqual(8);
    // render.json says which elasticity the fields used (default: anisotropic, from the material's Cij)
    expect(summary.elasticity.model).toBe('anisotropic');
    expect(summary.note).toMatch(/anisotropic elasticity/);
    // and what the foil surfaces did (default: relaxed, said in words, with what is approximated; the demo's loops
    // are not relaxed)
    expect(summary.surfaces.setting).toBe('relaxed');
    expect(summary.surfaces.text).toMatch(/^relaxed foil surfaces/);
    expect(summary.surfaces.correctedLines).toBeGreaterThanOrEqual(3);
    expect(summary.surfaces.approximations.join(' ')).toMatch(/loops are not relaxed/);
    for (const e of summary.images) {
      expect(existsSync(e.png)).toBe(true);
      expect(existsSync(e.tiff)).toBe(true);
    }
    expect(existsSync(join(out, 'visibility.txt'))).toBe(true);
    // the last act: identification from synthetic micrographs of a hidden candidate (the demo's claim, printed)
    expect(r.out).toMatch(/identification from SYNTHETIC micrographs/);
    // which runs in the infinite medium for time, and says so
    expect(r.out).toMatch(/infinite-medium fields \(no surface relaxation\)/);
    expect(r.out).toMatch(/hidden truth: b = 1\/2\[0 -1 1\] -> recovered as the best candidate/);
  });
});
