import { defineConfig } from 'vitest/config';

// The fast tests of the fit pipeline, for the mutation run of the stages of src/fit (stryker.fit.config.mjs): the
// direct tests of each stage and the quick fits of whole lists. Left out: the pulls and coverage over hundreds of
// fits, the CO database and the 5 000-line list (`npm test` runs them).
export default defineConfig({
  test: {
    include: [
      'test/fit/{fit-lines,higher-terms,term-level,isotopologues,engine-reference,warnings-reference}.test.ts',
      'test/fit/{truncation,scatter,rejection-and-fill,stated-scale,m-term}.test.ts',
      'test/fit/stages/**/*.test.ts',
    ],
    environment: 'node',
    testTimeout: 120_000,
  },
});
