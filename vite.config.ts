/// <reference types="vitest/config" />
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { VitePWA } from 'vite-plugin-pwa';

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

/**
 * The installable app: a web app manifest and a service worker (Workbox `generateSW`) that precaches the
 * shell and every screen's chunks, so a technician's phone opens Coilpath without signal. Navigations fall
 * back to the cached index.html; the API is never served from the worker's cache (TanStack Query keeps the
 * technician's data in IndexedDB instead: apps/web/src/lib/query-persist.tsx), except the photo thumbnails.
 */
const pwa = VitePWA({
  registerType: 'autoUpdate',
  injectRegister: 'script-defer',
  includeAssets: ['coilpath-mark.svg'],
  manifest: {
    id: '/',
    name: 'Coilpath',
    short_name: 'Coilpath',
    description: 'Operations and scheduling for commercial HVAC contractors: the route, the visit, the record.',
    start_url: '/',
    scope: '/',
    display: 'standalone',
    orientation: 'any',
    theme_color: '#17212B',
    background_color: '#F4F7F9',
    icons: [
      { src: '/icons/coilpath-192.png', sizes: '192x192', type: 'image/png', purpose: 'any' },
      { src: '/icons/coilpath-512.png', sizes: '512x512', type: 'image/png', purpose: 'any' },
      { src: '/icons/coilpath-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
      { src: '/coilpath-mark.svg', sizes: 'any', type: 'image/svg+xml', purpose: 'any' },
    ],
  },
  workbox: {
    globPatterns: ['**/*.{js,css,html,svg,png,woff2,webmanifest}'],
    navigateFallback: '/index.html',
    navigateFallbackDenylist: [/^\/api\//],
    cleanupOutdatedCaches: true,
    // A new worker takes over at once, and the first visit's page is controlled without a reload, so a
    // technician who signed in once this morning can open the app on the roof.
    skipWaiting: true,
    clientsClaim: true,
    runtimeCaching: [
      {
        // Photo thumbnails on the technician's briefings (`/api/attachments/:id?thumb=1`; a stored file never changes).
        urlPattern: ({ url, request }) =>
          request.method === 'GET' && url.searchParams.has('thumb') && /^\/api\/attachments\/[^/]+$/.test(url.pathname),
        handler: 'CacheFirst',
        options: {
          cacheName: 'coilpath-thumbnails',
          expiration: { maxEntries: 400, maxAgeSeconds: 14 * 86_400 },
          cacheableResponse: { statuses: [200] },
        },
      },
    ],
  },
});

export default defineConfig({
  root: '.',
  publicDir: 'apps/web/public',
  plugins: [react(), tailwindcss(), pwa],
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
        test: { name: 'api', include: ['apps/api/src/**/*.test.ts'], testTimeout: 30_000, hookTimeout: 120_000, ...databaseTests },
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
