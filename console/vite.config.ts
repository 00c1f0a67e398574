// Vite build of the Ebullio console: served by the API server at /console (server/console/static.ts).
//   npm run build        → console/dist
//   npm run dev:console  → dev server with a proxy to the API on :8080
// The console reaches shared/ by relative imports (types only, plus the zod-free shared/access.ts).
import vue from '@vitejs/plugin-vue';
import { defineConfig } from 'vite';
import vuetify from 'vite-plugin-vuetify';

const apiTarget = process.env.EBULLIO_API ?? 'http://localhost:8080';

export default defineConfig({
  root: import.meta.dirname,
  base: '/console/',
  // vite-plugin-vuetify's autoImport pulls in only the components and directives the templates use.
  plugins: [vue(), vuetify({ autoImport: true })],
  build: {
    outDir: 'dist',
    emptyOutDir: true,
    chunkSizeWarningLimit: 600,
  },
  server: {
    port: 5173,
    proxy: {
      '/console-api': apiTarget,
      '/v1': apiTarget,
      '/openapi.json': apiTarget,
      '/docs': apiTarget,
    },
  },
});
