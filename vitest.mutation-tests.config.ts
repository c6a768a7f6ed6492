import { defineConfig } from 'vitest/config';

// The tests named in MUTATION_TESTS (comma-separated globs), for a mutation run of one folder against the tests
// that cover it (stryker.tests.config.mjs), e.g.
//   MUTATION_TESTS='test/constants/**/*.test.ts' npm run mutation -- stryker.tests.config.mjs \
//     --mutate 'src/constants/**/*.ts'
const include = (process.env.MUTATION_TESTS ?? '')
  .split(',')
  .map((s) => s.trim())
  .filter((s) => s.length > 0);
if (include.length === 0) throw new Error('MUTATION_TESTS names no test file');

export default defineConfig({
  test: { include, environment: 'node', testTimeout: 120_000 },
});
