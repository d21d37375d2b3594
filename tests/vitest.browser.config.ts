import { defineConfig } from 'vitest/config';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('..', import.meta.url));

// Browser tests: playwright-core drives Debian's Chromium against the built app that scripts/test.mjs serves.
export default defineConfig({
  root,
  test: {
    include: ['tests/browser/**/*.test.ts'],
    environment: 'node',
    testTimeout: 90_000,
    hookTimeout: 90_000,
    fileParallelism: false,
    pool: 'forks',
  },
});
