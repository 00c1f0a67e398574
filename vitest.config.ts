import vue from '@vitejs/plugin-vue';
import { defineConfig } from 'vitest/config';

// Three projects: the server (node), the console's components and stores (happy-dom, Vue SFCs),
// and the browser tests. The browser tests run after the other two (groupOrder 1) and one file at
// a time: each starts a server and a Chromium, and on the 2-core CI machine two such pairs beside
// other test workers are the likely cause of a CI run in which two sign-ins timed out at 30 s.
export default defineConfig({
  test: {
    testTimeout: 20_000,
    projects: [
      {
        extends: true,
        test: {
          name: 'server',
          include: ['tests/**/*.test.ts'],
          exclude: ['tests/console/**', 'tests/e2e/**', '**/node_modules/**'],
          environment: 'node',
        },
      },
      {
        extends: true,
        test: {
          name: 'browser',
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          maxWorkers: 1,
          sequence: { groupOrder: 1 },
        },
      },
      {
        extends: true,
        plugins: [vue()],
        test: {
          name: 'console',
          include: ['tests/console/**/*.test.ts'],
          environment: 'happy-dom',
          // Vuetify's components import their .css: let Vite transform them instead of Node.
          server: { deps: { inline: ['vuetify'] } },
        },
      },
    ],
  },
});
