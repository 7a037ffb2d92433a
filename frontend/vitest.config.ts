import { defineProject } from 'vitest/config';
import react from '@vitejs/plugin-react';

const contracts = decodeURIComponent(
  new URL('../packages/contracts/src/index.ts', import.meta.url).pathname,
);

export default defineProject({
  plugins: [react()],
  resolve: { alias: { '@kinpath/contracts': contracts } },
  test: {
    name: 'frontend',
    root: decodeURIComponent(new URL('.', import.meta.url).pathname),
    environment: 'jsdom',
    include: ['src/**/*.test.{ts,tsx}'],
    setupFiles: ['./src/test/setup.ts'],
    css: false,
  },
});
