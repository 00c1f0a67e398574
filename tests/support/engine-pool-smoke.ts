// Run by tests/http/engine-pool.test.ts as `node --import tsx tests/support/engine-pool-smoke.ts`
// (the way the server runs): one three-effect train through a one-thread pool, printed as JSON.
import { createEnginePool } from '../../server/workers/engine-pool.js';

const pool = createEnginePool({ workers: 1, taskTimeoutMs: 30_000 });
const [outcome] = await pool.runMany('evaporators.multiple-effect', [
  {
    mode: 'design',
    spec: {
      liquor: { builtIn: 'sodium-hydroxide' },
      feed: { massFlow: 10, massFraction: 0.1, temperature: 333.15 },
      productMassFraction: 0.3,
      steam: { pressure: 1e6 },
      lastEffectPressure: 15e3,
      overallHeatTransferCoefficients: [2800, 2000, 1300],
      feedArrangement: 'backward',
    },
  },
]);
await pool.destroy();
console.log(JSON.stringify(outcome));
