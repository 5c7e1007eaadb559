/// <reference types="vitest/config" />
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';

const apiPort = process.env.PORT ?? '3000';

/**
 * The projects that open databases: one migrated template per run (apps/api/src/testing/global-setup.ts),
 * which each test file clones, and cheap password hashes (apps/api/src/auth/password.ts).
 */
const databaseTests = {
  globalSetup: ['apps/api/src/testing/global-setup.ts'],
  env: { COILPATH_PASSWORD_COST: 'test' },
};
const webSrc = fileURLToPath(new URL('./apps/web/src', import.meta.url));

export default defineConfig({
  root: '.',
  publicDir: 'apps/web/public',
  plugins: [react(), tailwindcss()],
  resolve: { alias: { '@': webSrc } },
  build: { outDir: 'apps/web/dist', emptyOutDir: true, chunkSizeWarningLimit: 600, manifest: true },
  server: { port: 5173, proxy: { '/api': `http://127.0.0.1:${apiPort}` } },
  test: {
    // Vitest's default is one worker fewer than the cores: a single worker on a 2-core machine. The API test
    // files spend their time in PGlite (one thread each) or waiting on a server, so two share two cores well.
    maxWorkers: Math.max(2, availableParallelism() - 1),
    projects: [
      { extends: false, test: { name: 'calc', include: ['packages/calc/src/**/*.test.ts'] } },
      { extends: false, test: { name: 'contract', include: ['packages/contract/src/**/*.test.ts'] } },
      {
        extends: false,
        test: { name: 'api', include: ['apps/api/src/**/*.test.ts'], testTimeout: 30_000, hookTimeout: 60_000, ...databaseTests },
      },
      {
        extends: false,
        resolve: { alias: { '@': webSrc } },
        test: { name: 'web', include: ['apps/web/src/**/*.test.{ts,tsx}'] },
      },
      {
        extends: false,
        test: {
          name: 'tests',
          include: ['tests/api/**/*.test.ts', 'tests/reference/**/*.test.ts'],
          testTimeout: 60_000,
          hookTimeout: 120_000,
          ...databaseTests,
        },
      },
    ],
  },
});
