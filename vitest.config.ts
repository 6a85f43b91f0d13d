import { defineConfig } from 'vitest/config';

// One suite: pure unit tests, API integration tests against the real PostgreSQL started by
// scripts/run-tests.ts, and browser tests. Files run one after another because the integration
// tests share one database and one of them stops and restarts PostgreSQL.
export default defineConfig({
  // The path aliases (@shared/…, @api/…) are declared once, in tsconfig.json.
  resolve: { tsconfigPaths: true },
  test: {
    include: ['{shared,api,jobs,tests,web,scripts}/**/*.test.{ts,tsx}'],
    exclude: ['**/node_modules/**', 'web/dist/**', '.data/**'],
    fileParallelism: false,
    testTimeout: 30_000,
    hookTimeout: 120_000,
    pool: 'forks',
  },
});
