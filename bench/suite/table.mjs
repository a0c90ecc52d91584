// Prints the per-file CPU record of `npm run suite-cpu`, slowest first, and the total.
import { readFileSync } from 'node:fs';
import { relative } from 'node:path';

const file = process.argv[2] ?? process.env.THINFOIL_SUITE_CPU ?? '/tmp/thinfoil-suite-cpu.tsv';
const rows = readFileSync(file, 'utf8').trim().split('\n').map((l) => {
  const [path, cpu, wall] = l.split('\t');
  return { path: relative(process.cwd(), path), cpu: Number(cpu), wall: Number(wall) };
});
rows.sort((a, b) => b.cpu - a.cpu);
const total = rows.reduce((s, r) => s + r.cpu, 0);
console.log(`${'file'.padEnd(48)} ${'CPU s'.padStart(7)} ${'wall s'.padStart(7)}`);
for (const r of rows.slice(0, Number(process.env.TOP ?? 20))) console.log(`${r.path.padEnd(48)} ${r.cpu.toFixed(1).padStart(7)} ${r.wall.toFixed(1).padStart(7)}`);
console.log(`${rows.length} files, ${total.toFixed(1)} CPU s in all (a lower bound for the wall time: this total / cores)`);
