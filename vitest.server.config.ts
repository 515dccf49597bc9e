import { defineConfig } from 'vitest/config';

// Server, API and integration tests; the Angular app's specs run under `ng test`.
export default defineConfig({
  test: {
    include: ['server/**/*.test.ts', 'seed/**/*.test.ts', 'shared/**/*.test.ts', 'tests/api/**/*.test.ts', 'tests/integration/**/*.test.ts'],
    environment: 'node',
    testTimeout: 30_000,
    hookTimeout: 60_000,
    pool: 'forks',
    env: { LOG_LEVEL: 'silent' },
  },
});
