// Mutation run for the stages of src/fit: only the fast fit tests of vitest.mutation-fit.config.ts run against
// each mutant (not the species, models or derive tests, nor the slow statistical ones), so the score is a lower
// bound of the full run's. One group of files at a time, each with its own incremental file:
//   npm run mutation -- stryker.fit.config.mjs --mutate 'src/fit/outliers.ts,src/fit/level-selection.ts' \
//     --incrementalFile test/mutation/fit-stages-a.json
import base from './stryker.config.mjs';

/** @type {import('@stryker-mutator/api/core').PartialStrykerOptions} */
export default {
  ...base,
  vitest: { ...base.vitest, configFile: 'vitest.mutation-fit.config.ts' },
  timeoutMS: 6000,
};
