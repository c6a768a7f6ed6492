// Mutation run of one folder against the tests named in the environment variable MUTATION_TESTS (see
// vitest.mutation-tests.config.ts): for folders whose tests are not in vitest.mutation.config.ts. Example:
//   MUTATION_TESTS='test/constants/**/*.test.ts' npm run mutation -- stryker.tests.config.mjs \
//     --mutate 'src/constants/**/*.ts'
import base from './stryker.config.mjs';

/** @type {import('@stryker-mutator/api/core').PartialStrykerOptions} */
export default {
  ...base,
  vitest: { ...base.vitest, configFile: 'vitest.mutation-tests.config.ts' },
  timeoutMS: 6000,
};
