import { defineConfig } from 'vitest/config';

// The direct reference tests of the numeric kernels, for the quicker mutation run of stryker.direct.config.mjs.
export default defineConfig({
  test: {
    include: ['test/{linalg,stats}/**/*.test.ts', 'test/fit/{engine-reference,warnings-reference}.test.ts'],
    environment: 'node',
    testTimeout: 120_000,
  },
});
