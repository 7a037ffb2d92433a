import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';

const contracts = decodeURIComponent(
  new URL('../packages/contracts/src/index.ts', import.meta.url).pathname,
);

export default defineConfig({
  plugins: [react()],
  resolve: {
    // The contracts package builds to CommonJS; the client bundles its TypeScript sources instead.
    alias: { '@kinpath/contracts': contracts },
  },
  server: {
    host: '127.0.0.1',
    proxy: { '/api': { target: 'http://127.0.0.1:3000', changeOrigin: false } },
    // The fonts live in the repository's top-level fonts/ folder.
    fs: { allow: ['..'] },
  },
  build: {
    outDir: 'dist',
    emptyOutDir: true,
    // Keep the built page free of inline scripts so `script-src 'self'` holds.
    modulePreload: { polyfill: false },
    assetsInlineLimit: 0,
    chunkSizeWarningLimit: 1500,
  },
});
