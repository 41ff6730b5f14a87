import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

// Library and API tests. Web unit tests run through `ng test`; browser tests through Playwright.
const alias = {
  '@nightyard/contracts': fileURLToPath(new URL('./libs/contracts/src/index.ts', import.meta.url)),
  '@nightyard/scheduling': fileURLToPath(new URL('./libs/scheduling/src/index.ts', import.meta.url)),
};

export default defineConfig({
  resolve: { alias },
  test: {
    projects: [
      {
        resolve: { alias },
        test: {
          name: 'libs',
          environment: 'node',
          include: ['libs/**/*.spec.ts'],
          testTimeout: 60_000,
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'api',
          environment: 'node',
          include: ['apps/api/**/*.spec.ts', 'tools/**/*.spec.ts'],
          globalSetup: ['apps/api/src/testing/global-setup.ts'],
          // One database for the run: files share it, so they run one at a time.
          fileParallelism: false,
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
    ],
  },
});
