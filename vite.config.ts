/// <reference types="vitest/config" />
import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';

// One config for the client build (Vite) and the test suite (Vitest).
export default defineConfig({
  plugins: [react(), tailwindcss()],
  build: { outDir: 'dist/client', emptyOutDir: true },
  server: {
    port: 5173,
    proxy: { '/api': 'http://localhost:3000', '/public': 'http://localhost:3000' },
  },
  test: {
    include: ['tests/**/*.test.ts', 'tests/**/*.test.tsx'],
    environment: 'node',
    testTimeout: 60_000,
    hookTimeout: 120_000,
    // Browser and API tests start servers and SQLite files: keep files isolated in forks.
    pool: 'forks',
    fileParallelism: true,
    maxWorkers: 2,
  },
});
