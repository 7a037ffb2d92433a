import { defineConfig } from 'vitest/config';

// Each workspace owns its test project; `npm test` (tools/test.mjs) sets up
// PostgreSQL, the mail catcher and a running server before this runs.
export default defineConfig({
  test: {
    projects: ['packages/engine', 'backend', 'frontend', 'frontend/e2e'],
  },
});
