/**
 * Ends a test run with one line naming the Debian packages that would enable
 * the checks skipped for a missing Python reference (test/python.ts puts
 * them in the skip note). It reads the results in the main process, so it
 * works with every pool ('forks' included) and needs no files.
 */
import type { Reporter, TestCase } from 'vitest/node';
import { SKIP_NOTE_PREFIX } from './python.js';

export default class PythonSkipsReporter implements Reporter {
  private readonly packages = new Set<string>();
  private skipped = 0;

  onTestRunStart(): void {
    this.packages.clear();
    this.skipped = 0;
  }

  onTestCaseResult(testCase: TestCase): void {
    const r = testCase.result();
    if (r.state !== 'skipped' || r.note === undefined || !r.note.startsWith(SKIP_NOTE_PREFIX)) return;
    this.skipped++;
    const list = r.note.slice(SKIP_NOTE_PREFIX.length).split(';')[0];
    for (const p of list.split(',')) if (p.trim() !== '') this.packages.add(p.trim());
  }

  onTestRunEnd(): void {
    if (this.skipped === 0) return;
    const pk = [...this.packages].sort();
    process.stdout.write(
      `\n${this.skipped} reference check(s) skipped for want of Python; to run them install Debian's ${pk.join(' ')} (apt-get install ${pk.join(' ')})\n`,
    );
  }
}
