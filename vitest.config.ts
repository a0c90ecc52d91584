import { availableParallelism } from 'node:os';
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    // a timeout catches a hang, not a slow machine: with a worker per core on a loaded machine a test of
    // 60 s alone took 160 s (test/cli/blindBenchmark.test.ts at load 12); per-test timeouts are left out
    testTimeout: 600_000,
    hookTimeout: 600_000,
    pool: 'forks',
    // vitest's default is one worker fewer than the cores: on a 2-core machine that runs every file in series
    maxWorkers: availableParallelism(),
    // one fork runs many files (no new process and module graph per file: about 0.2 s CPU saved per file);
    // the tests keep no state across files (temporary folders, no mocks of shared modules)
    isolate: false,
    // the second reporter prints one line naming the Debian packages behind skipped Python checks (test/python.ts)
    reporters: ['default', './test/pythonSkipsReporter.ts'],
  },
});
