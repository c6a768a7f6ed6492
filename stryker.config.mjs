// Mutation testing of the science (src/). Run with `npm run mutation`, or one folder at a time:
//   npm run mutation -- --mutate 'src/derive/**/*.ts'
// Not in CI: on two cores a folder takes from minutes to an hour. Incremental mode keeps the results of the last
// run of each folder in test/mutation/<folder>.json (committed; scripts/mutation.mjs passes it), so only mutants in
// changed code, or covered by changed tests, are tested again. A run rewrites that file: commit it with the tests
// it measured, or `git checkout test/mutation` to drop it.
/** @type {import('@stryker-mutator/api/core').PartialStrykerOptions} */
export default {
  testRunner: 'vitest',
  plugins: ['@stryker-mutator/vitest-runner'],
  vitest: { configFile: 'vitest.mutation.config.ts', related: false },
  // Stryker rewrites `extends`/`references` paths of this tsconfig with ts.parseConfigFileTextToJson, which
  // TypeScript 7 no longer has. The project's tsconfig has neither, so point Stryker at a file that does not exist
  // and the rewrite is skipped.
  tsconfigFile: 'tsconfig.stryker-none.json',
  mutate: ['src/**/*.ts', '!src/**/*.generated.ts'],
  // Vitest does not type-check, so no `// @ts-nocheck` is needed; leaving files as they are also keeps the test
  // that compares the generated nuclide table with its generator's output green in the sandbox.
  disableTypeChecks: false,
  coverageAnalysis: 'perTest',
  ignoreStatic: true,
  incremental: true,
  // Used only when stryker is run by hand without --incrementalFile; scripts/mutation.mjs always passes one.
  incrementalFile: 'test/mutation/incremental.json',
  concurrency: 1,
  timeoutMS: 20000,
  timeoutFactor: 2,
  reporters: ['clear-text', 'progress', 'json'],
  jsonReporter: { fileName: 'reports/mutation/mutation.json' },
  clearTextReporter: { allowColor: false, reportTests: false, reportMutants: false, reportScoreTable: true },
  tempDirName: '.stryker-tmp',
  cleanTempDir: 'always',
};
