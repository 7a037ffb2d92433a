import swc from 'unplugin-swc';
import { defineConfig } from 'vitest/config';

// SWC instead of esbuild so decorator metadata, which Nest's injection reads, is emitted.
export default defineConfig({
  plugins: [
    swc.vite({
      jsc: {
        target: 'es2022',
        parser: { syntax: 'typescript', decorators: true },
        transform: {
          legacyDecorator: true,
          decoratorMetadata: true,
          useDefineForClassFields: false,
        },
      },
    }),
  ],
  test: {
    name: 'backend',
    root: __dirname,
    environment: 'node',
    include: ['src/**/*.spec.ts', 'test/**/*.test.ts'],
    // API tests share one server and database; running files one at a time keeps them independent.
    fileParallelism: false,
    testTimeout: 30_000,
    hookTimeout: 60_000,
  },
});
