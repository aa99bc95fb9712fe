import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';

// Absolute, so the server can load this file in middleware mode from any working directory.
const root = fileURLToPath(new URL('./client', import.meta.url));

// Two entries, one manifest (client/dist/.vite/manifest.json), keys relative to client/:
//   'index.html' → the /capture React app;  'office.ts' → the office pages' CSS (+ tiny script).
export default defineConfig({
  root,
  base: '/static/',
  plugins: [react(), tailwindcss()],
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
    },
  },
});
