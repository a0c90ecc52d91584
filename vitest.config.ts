import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    pool: 'forks',
    // the second reporter prints one line naming the Debian packages behind skipped Python checks (test/python.ts)
    reporters: ['default', './test/pythonSkipsReporter.ts'],
  },
});
