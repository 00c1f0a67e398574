/* global module */
/** Import rules for server/ and shared/: no circular imports. `npx depcruise server shared --config .dependency-cruiser.cjs` */
module.exports = {
  forbidden: [
    {
      name: 'no-circular',
      severity: 'error',
      comment: 'Imports flow one way; a circle means two modules own each other.',
      from: {},
      to: { circular: true },
    },
  ],
  options: {
    doNotFollow: { path: 'node_modules' },
    tsPreCompilationDeps: true,
    tsConfig: { fileName: 'tsconfig.json' },
  },
};
