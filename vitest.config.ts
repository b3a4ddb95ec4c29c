import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    // ENGINE_VERSION's hash of server/core, brought up to date before the tests run the engine from source
    globalSetup: ['./scripts/engine-version.mjs'],
    testTimeout: 60_000,
    hookTimeout: 60_000,
    pool: 'forks',
  },
});
