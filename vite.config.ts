import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { VitePWA } from 'vite-plugin-pwa';
import { precompress } from './scripts/precompress';

// Absolute, so the server can load this file in middleware mode from any working directory.
const root = fileURLToPath(new URL('./client', import.meta.url));

// Two entries, one manifest (client/dist/.vite/manifest.json), keys relative to client/:
//   'index.html' → the /capture React app;  'office.ts' → the office pages' CSS (+ tiny script).
export default defineConfig({
  root,
  base: '/static/',
  resolve: {
    // The query persister packages pin an older patch of @tanstack/query-core; one copy for all
    // (the same v5 API) keeps the first screen from carrying two.
    dedupe: ['@tanstack/query-core'],
  },
  plugins: [
    react(),
    tailwindcss(),
    // The capture app's service worker (workbox generateSW): precaches the app shell and every
    // capture chunk so /capture opens without signal after one visit. Built to client/dist/sw.js;
    // the server serves it at /capture/sw.js with scope /capture (server/routes/capture.ts).
    VitePWA({
      strategies: 'generateSW',
      injectRegister: false, // registered by client/app/service-worker.ts at /capture/sw.js
      registerType: 'prompt', // a new version waits until the app is closed: never swap code mid-walk
      filename: 'sw.js',
      manifestFilename: 'manifest.webmanifest',
      includeManifestIcons: false, // icon.svg is precached by the glob below
      manifest: {
        id: '/capture',
        name: 'Crowntip Capture',
        short_name: 'Crowntip',
        description: 'Field walks: shoot lengths, live biomass estimate, works without signal.',
        start_url: '/capture',
        scope: '/capture',
        display: 'standalone',
        orientation: 'portrait',
        background_color: '#f5f3ec',
        theme_color: '#23201a',
        icons: [{ src: 'icon.svg', sizes: 'any', type: 'image/svg+xml', purpose: 'any' }],
      },
      workbox: {
        // The capture app only: its HTML, JS, CSS, icons and the woff2 font subset. The office
        // stylesheet and script, the older woff fonts and Vite's manifest stay out.
        globPatterns: ['**/*.{html,js,css,svg,woff2,webmanifest}'],
        globIgnores: ['**/office-*', '.vite/**', 'sw.js'],
        // Files live under /static/ while the worker is served from /capture/sw.js: absolute URLs.
        modifyURLPrefix: { '': '/static/' },
        // Page loads under /capture ask the server first (it signs people in and serves the
        // current shell); without an answer in 4 s, or without signal, the copy kept from an
        // earlier visit, else the precached shell, so any screen of any walk opens offline.
        navigateFallback: null,
        runtimeCaching: [
          {
            urlPattern: ({ request, url }) => request.mode === 'navigate' && /^\/capture(?:\/|$)/.test(url.pathname),
            handler: 'NetworkFirst',
            options: {
              cacheName: 'capture-pages',
              networkTimeoutSeconds: 4,
              expiration: { maxEntries: 20 },
              precacheFallback: { fallbackURL: '/static/index.html' },
            },
          },
        ],
        inlineWorkboxRuntime: true, // one file: nothing else to serve under /capture
        cleanupOutdatedCaches: true,
        clientsClaim: true, // the first visit's page is controlled at once, so it works offline right after
        skipWaiting: false,
      },
    }),
    // .br and .gz beside each text file of client/dist, written after the service worker.
    precompress(),
  ],
  build: {
    outDir: 'dist',
    emptyOutDir: true,
    manifest: true,
    // Vite 8 (rolldown) name for rollupOptions.
    rolldownOptions: {
      input: {
        capture: fileURLToPath(new URL('./client/index.html', import.meta.url)),
        office: fileURLToPath(new URL('./client/office.ts', import.meta.url)),
      },
      output: {
        codeSplitting: {
          // Everything the first /capture screen imports statically goes in one chunk (the
          // default splits it into several shared chunks, and each file compresses on its own).
          // Later screens stay in their own lazy chunks and import from it.
          // The field geometry (@turf) keeps a chunk of its own, loaded with the plan screen
          // (tests/client/first-screen-imports.test.ts keeps it off the first screen).
          groups: [
            { name: 'geometry', test: /node_modules[\\/]@turf[\\/]/, priority: 2 },
            {
              name: 'capture-first',
              tags: ['$initial'],
              // Not the office entry nor any stylesheet (the office imports its own CSS, and a
              // captured stylesheet module would make the office pages load the capture app).
              test: (id) => !/[\\/]client[\\/]office\.ts$/.test(id) && !/\.css(\?|$)/.test(id),
              priority: 1,
            },
          ],
        },
      },
    },
  },
});
