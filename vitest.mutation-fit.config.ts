import { defineConfig } from 'vitest/config';

// The fast tests of the fit pipeline, for the mutation run of the stages of src/fit (stryker.fit.config.mjs): the
// direct tests of each stage (test/fit/stages) and the quick fits of whole lists. Left out: the pulls and coverage
// over hundreds of fits, the CO database, the 5 000-line list, and the scatter and stated-scale scenarios over
// 200 lists, whose stages have direct tests here (`npm test` runs them all).
export default defineConfig({
  test: {
    include: [
      'test/fit/{fit-lines,higher-terms,term-level,isotopologues,engine-reference,warnings-reference}.test.ts',
      'test/fit/{truncation,rejection-and-fill,m-term}.test.ts',
      'test/fit/stages/**/*.test.ts',
    ],
    environment: 'node',
    testTimeout: 120_000,
  },
});
