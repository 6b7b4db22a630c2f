import { defineConfig } from 'vitest/config';
import react from '@vitejs/plugin-react';

// One config for the viewer build (vite) and the test runner (vitest).
export default defineConfig({
  root: 'viewer',
  base: './',
  plugins: [react()],
  build: { outDir: '../dist/viewer', emptyOutDir: true, chunkSizeWarningLimit: 2000 },
  test: {
    root: '.',
    include: ['test/**/*.test.ts'],
    setupFiles: ['test/setup.ts'],
    testTimeout: 60_000,
    hookTimeout: 180_000,
    pool: 'forks',
  },
});
