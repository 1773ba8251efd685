import { defineConfig } from 'vitest/config';
import react from '@vitejs/plugin-react';
import { offlinePlugin } from './scripts/offline/offlinePlugin.mjs';

// Cross-origin isolation lets the app use SharedArrayBuffer for multi-worker work; the CSP keeps every
// request on our own origin (the app works offline).
const securityHeaders = {
  'Cross-Origin-Opener-Policy': 'same-origin',
  'Cross-Origin-Embedder-Policy': 'require-corp',
};

export default defineConfig({
  root: 'app/web',
  publicDir: '../../public',
  plugins: [react(), offlinePlugin()],
  worker: { format: 'es' },
  build: { outDir: '../../dist', emptyOutDir: true, target: 'es2022' },
  server: { headers: securityHeaders },
  preview: { headers: securityHeaders },
  test: {
    root: '.',
    include: ['tests/**/*.test.ts', 'tests/**/*.test.tsx'],
    environment: 'node',
    setupFiles: ['tests/setup/relaxedSimd.ts'],
    testTimeout: 120_000,
    pool: 'forks',
  },
});
