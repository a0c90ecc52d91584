/**
 * CPU seconds per test file, for `npm run suite-cpu` (bench/suite/vitest.cpu.config.ts).
 * Wall time on a shared machine follows the load; CPU time does not. Counted: the
 * vitest worker process, its threads, and the children it has reaped (the CLI
 * processes a test spawns, python3), from /proc/self/stat (Linux only).
 * Appends "file<TAB>cpu s<TAB>wall s" to $THINFOIL_SUITE_CPU (default /tmp/thinfoil-suite-cpu.tsv).
 */
import { afterAll, beforeAll, expect } from 'vitest';
import { appendFileSync, readFileSync } from 'node:fs';

const OUT = process.env.THINFOIL_SUITE_CPU ?? '/tmp/thinfoil-suite-cpu.tsv';
/** utime + stime + cutime + cstime in seconds (clock ticks of 10 ms) */
function cpuSeconds(): number {
  const f = readFileSync('/proc/self/stat', 'utf8').split(') ')[1].split(' ');
  return (Number(f[11]) + Number(f[12]) + Number(f[13]) + Number(f[14])) / 100;
}
let cpu0 = 0;
let wall0 = 0;
beforeAll(() => {
  cpu0 = cpuSeconds();
  wall0 = performance.now();
});
afterAll(() => {
  const file = expect.getState().testPath ?? '?';
  appendFileSync(OUT, `${file}\t${(cpuSeconds() - cpu0).toFixed(2)}\t${((performance.now() - wall0) / 1000).toFixed(2)}\n`);
});
