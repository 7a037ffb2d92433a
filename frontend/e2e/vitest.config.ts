import { defineConfig } from 'vitest/config';

// End-to-end tests: headless Chromium against the built app served by the
// running test server (`npm test` starts it and sets KINPATH_TEST_URL).
export default defineConfig({
  test: {
    name: 'e2e',
    include: ['**/*.e2e.test.ts'],
    environment: 'node',
    testTimeout: 60_000,
    hookTimeout: 60_000,
    fileParallelism: false,
  },
});
