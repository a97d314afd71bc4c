import path from 'node:path';
import { defineConfig } from 'vitest/config';

export default defineConfig({
  resolve: {
    alias: [
      { find: /^@\//, replacement: `${path.resolve(import.meta.dirname)}/` },
      { find: /^server-only$/, replacement: path.resolve(import.meta.dirname, 'tests/support/empty.ts') },
      // next-auth's core is not in its exports map; tests drive its real credentials flow through it.
      { find: /^next-auth\/core$/, replacement: path.resolve(import.meta.dirname, 'node_modules/next-auth/core/index.js') },
    ],
  },
  test: {
    include: ['tests/unit/**/*.test.ts', 'tests/integration/**/*.test.ts', 'tests/spice/**/*.test.ts'],
    environment: 'node',
    testTimeout: 30_000,
    hookTimeout: 60_000,
    fileParallelism: false,
    setupFiles: ['tests/support/setup-env.ts'],
  },
});
