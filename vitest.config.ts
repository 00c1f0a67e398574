import vue from '@vitejs/plugin-vue';
import { defineConfig } from 'vitest/config';

// Four projects: the server (node), the server-side suites again on PostgreSQL, the console's
// components and stores (happy-dom, Vue SFCs), and the browser tests. The browser tests run after the other two (groupOrder 1) and one file at
// a time: each starts a server and a Chromium, and on the 2-core CI machine two such pairs beside
// other test workers are the likely cause of a CI run in which two sign-ins timed out at 30 s.
/**
 * Server-side suites that are about SQLite itself (its files, its triggers, processes started on a
 * DB_FILE), or that start their own databases, so a second run on PostgreSQL would test nothing new.
 */
const SQLITE_ONLY_SUITES = [
  'tests/http/private-files.test.ts',
  'tests/http/auth-revision.test.ts',
  'tests/http/core-startup.test.ts',
  'tests/http/server-lifecycle.test.ts',
  'tests/http/redis-shared-state.test.ts',
];

export default defineConfig({
  test: {
    testTimeout: 20_000,
    projects: [
      {
        extends: true,
        test: {
          name: 'server',
          include: ['tests/**/*.test.ts'],
          exclude: ['tests/console/**', 'tests/e2e/**', 'tests/cluster/**', '**/node_modules/**'],
          environment: 'node',
        },
      },
      {
        // The server-side suites once more on PostgreSQL (tests/support/test-store.ts): the HTTP
        // API, accounts, billing and the console API are held to the same tests on both databases.
        extends: true,
        test: {
          name: 'server-pg',
          include: [
            'tests/http/**/*.test.ts',
            'tests/accounts/**/*.test.ts',
            'tests/billing/**/*.test.ts',
            'tests/console-api/**/*.test.ts',
          ],
          exclude: ['**/node_modules/**', ...SQLITE_ONLY_SUITES],
          environment: 'node',
          env: { EBULLIO_TEST_DATABASE: 'postgres' },
          globalSetup: ['tests/support/postgres-global-setup.ts'],
          setupFiles: ['tests/support/postgres-setup-file.ts'],
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
        // Three nodes, PostgreSQL, Redis and HAProxy (tests/support/cluster.ts): alone, last, so its
        // load and its killed node meet no other suite's timing.
        extends: true,
        test: {
          name: 'cluster',
          include: ['tests/cluster/**/*.test.ts'],
          environment: 'node',
          maxWorkers: 1,
          sequence: { groupOrder: 2 },
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
