// A quicker mutation run for the numeric kernels (src/linalg, src/stats): only their direct reference tests
// (vitest.mutation-direct.config.ts) run against each mutant, not every fit that calls them. A mutant that only a
// fit would notice then counts as surviving, so the score is a lower bound of the full run's. Use:
//   npm run mutation -- stryker.direct.config.mjs --mutate 'src/linalg/**/*.ts'
import base from './stryker.config.mjs';

/** @type {import('@stryker-mutator/api/core').PartialStrykerOptions} */
export default {
  ...base,
  vitest: { ...base.vitest, configFile: 'vitest.mutation-direct.config.ts' },
  timeoutMS: 6000,
};
