import { defineConfig } from 'vitest/config';
import { fileURLToPath } from 'node:url';

// Tests run against the TypeScript sources (no build needed), except the
// protocol and CLI tests, which spawn the built `dist/` on purpose.
export default defineConfig({
  root: fileURLToPath(new URL('..', import.meta.url)),
  resolve: {
    alias: {
      '@pnlint/grammar': fileURLToPath(new URL('../grammar/src/index.ts', import.meta.url)),
    },
  },
  test: {
    include: ['test/**/*.test.ts'],
    exclude: ['**/node_modules/**', 'test/editor/**'],
    testTimeout: 60_000,
    // Suites that spawn the built server or ngspice set up in hooks; this machine is shared and slow at times.
    hookTimeout: 60_000,
    pool: 'forks',
    maxWorkers: 2,
  },
});
