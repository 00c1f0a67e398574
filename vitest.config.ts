import vue from '@vitejs/plugin-vue';
import { defineConfig } from 'vitest/config';

// Two projects: the server (node) and the console's components and stores (happy-dom, Vue SFCs).
export default defineConfig({
  test: {
    testTimeout: 20_000,
    projects: [
      {
        extends: true,
        test: {
          name: 'server',
          include: ['tests/**/*.test.ts'],
          exclude: ['tests/console/**', '**/node_modules/**'],
          environment: 'node',
        },
      },
      {
        extends: true,
        plugins: [vue()],
        resolve: { alias: { '@shared': new URL('./shared', import.meta.url).pathname } },
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
