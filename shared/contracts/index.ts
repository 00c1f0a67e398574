/** The v1 API contracts: one zod schema per request and response, shared by server and console. */
export * from './common.js';
export * from './steam.js';
export * from './liquors.js';
export * from './evaporators.js';
export * from './heat-transfer.js';
export * from './batch.js';
export * from './sweeps.js';
export * from './usage.js';
export * from './recompression.js';
export * from './studies.js';
export * from './jobs.js';
