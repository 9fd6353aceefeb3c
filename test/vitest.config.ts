import { defineConfig } from 'vitest/config';

// Integration tests share real ports, ngspice runs and SQLite files on a
// 2-core machine: a small pool keeps timings honest and avoids port races.
export default defineConfig({
  test: {
    root: new URL('..', import.meta.url).pathname,
    include: ['test/**/*.test.ts'],
    exclude: ['node_modules/**', 'test/bench/**'],
    testTimeout: 60_000,
    hookTimeout: 60_000,
    pool: 'forks',
    maxWorkers: 2,
    reporters: ['default'],
  },
});
