/* global module */
/**
 * The import rules of DEVELOPERS.md, checked by `npm run lint:deps` (part of `npm run lint`, so of `npm test`) with
 * dependency-cruiser: no import circles in server/ and shared/, and each room imports only the
 * rooms it may. Type-only imports count (tsPreCompilationDeps): a circle of types is a circle.
 */
module.exports = {
  forbidden: [
    {
      name: 'no-circular',
      severity: 'error',
      comment: 'Import circles make rooms depend on each other; compose in server/app.ts instead.',
      from: { path: '^(server|shared)/' },
      to: { circular: true },
    },
    {
      name: 'engine-imports-only-engine',
      severity: 'error',
      comment: 'The engine is pure: plain SI numbers in and out, no I/O, no HTTP, no zod.',
      from: { path: '^server/engine/' },
      // `module` is Node's createRequire, with which steam/if97.ts loads the CommonJS IF97 package.
      to: { pathNot: ['^server/engine/', '^node_modules/@neutrium/thermo\\.eos\\.iapws97/', '^module$'] },
    },
    {
      name: 'only-steam-imports-if97-package',
      severity: 'error',
      comment: 'One IAPWS-IF97 adapter: server/engine/steam/.',
      from: { pathNot: '^server/engine/steam/' },
      to: { path: '^node_modules/@neutrium/thermo\\.eos\\.iapws97/' },
    },
    {
      name: 'contracts-import-nothing-of-the-server',
      severity: 'error',
      comment: 'shared/ is read by the server and the console: zod and each other only.',
      from: { path: '^shared/' },
      to: { path: '^(server|console)/' },
    },
    {
      name: 'console-api-never-imports-v1-routers',
      severity: 'error',
      comment: 'The console API uses services; the /v1 routers are HTTP for API keys only.',
      from: { path: '^server/console/' },
      to: { path: '^server/http/v1/' },
    },
    {
      name: 'services-never-import-http-or-console',
      severity: 'error',
      comment: 'Services (accounts, billing, liquors, units, db) know nothing of routes.',
      from: { path: '^server/(accounts|billing|liquors|units|db|mail|integrations)/' },
      to: { path: '^server/(http/v1|console)/' },
    },
    {
      name: 'workers-import-only-the-engine-and-catalogue',
      severity: 'error',
      comment:
        'The calculation pool is an HTTP-free adapter: plain tasks in, plain outcomes out; it knows the engine, the operation catalogue, piscina and tsx only.',
      from: { path: '^server/workers/' },
      to: {
        pathNot: [
          '^server/workers/',
          '^server/engine/',
          // the operation ids that key the tasks (plain data)
          '^shared/(operations|access)[.]ts$',
          '^node_modules/piscina/',
          // the worker's bootstrap registers tsx in its thread
          '^node_modules/tsx/',
          '^tsx/esm/api$',
          '^(fs|os|worker_threads)$',
          '^node:',
        ],
      },
    },
    {
      name: 'engine-never-imports-the-workers',
      severity: 'error',
      comment: 'The engine is pure and knows nothing of threads; server/workers/ wraps it.',
      from: { path: '^server/engine/' },
      to: { path: '^server/workers/' },
    },
    {
      name: 'http-never-imports-the-console',
      severity: 'error',
      comment: 'server/app.ts composes the console API with the HTTP app; http/ does not know it.',
      from: { path: '^server/http/' },
      to: { path: '^server/console/' },
    },
    {
      name: 'routers-never-import-the-db-driver',
      severity: 'error',
      comment: 'A router calls services; only server/db opens the database.',
      from: { path: '^server/(http|console)/' },
      to: { path: '^node_modules/better-sqlite3/' },
    },
  ],
  options: {
    doNotFollow: { path: 'node_modules' },
    tsPreCompilationDeps: true,
    tsConfig: { fileName: 'tsconfig.json' },
    exclude: { path: '^(node_modules|console/dist)' },
  },
};
