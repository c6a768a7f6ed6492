import { defineConfig } from 'vitest/config';

// The fast tests that guard the science, for mutation testing (stryker.config.mjs). Left out: the network face,
// the browser, the CLI and the container checks (they test services/), the architecture test (it reads the source
// text, and Stryker's instrumented copy names a global it forbids), and the slow statistical and scenario tests
// (pulls and coverage over hundreds of fits, the 5 000-line list, automatic assignment, spectra, potential
// curves), which `npm test` runs: on two cores
// they would make one folder take hours. A mutant only they would kill is reported as surviving here.
export default defineConfig({
  test: {
    include: [
      'test/{constants,derive,species,stats,linalg,helpers,models}/**/*.test.ts',
      'test/fit/{fit-lines,higher-terms,term-level,isotopologues,engine-reference,warnings-reference}.test.ts',
      'test/qa/temperature.test.ts',
    ],
    environment: 'node',
    testTimeout: 120_000,
  },
});
