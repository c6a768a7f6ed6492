import { defineConfig } from 'vitest/config';

// The tests that guard the science, for mutation testing (stryker.config.mjs): everything under test/ except the
// network face, the browser, the CLI and the container checks, which are slow and test services/, not src/, and
// the architecture test, which reads the source text (Stryker's instrumented copy names a global it forbids).
export default defineConfig({
  test: {
    include: [
      'test/{constants,derive,fit,linalg,models,species,stats,qa,assign,spectra,potential,helpers}/**/*.test.ts',
    ],
    environment: 'node',
    testTimeout: 120_000,
  },
});
