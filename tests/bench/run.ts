/**
 * `npm run bench`: every speed and size target measured in one run, printed as figures and
 * ratios (never asserted by timed unit tests). Each section also runs alone:
 * `npx tsx tests/bench/<section>.ts`.
 */
import os from 'node:os';
import { runSteamBench } from './steam.js';
import { runSingleEffectBench } from './single-effect.js';
import { runMultipleEffectBench } from './multiple-effect.js';
import { runMechanicalVaporRecompressionBench } from './mechanical-vapor-recompression.js';
import { runSchemeStudyBench } from './scheme-study.js';
import { runHeatTransferBench } from './heat-transfer.js';
import { runApiBench } from './api.js';
import { runBundleBench } from './bundle.js';
import { runDrainBench } from './drain.js';
import { runHashFloodBench } from './hash-flood.js';
import { runPoolBench } from './pool.js';
import { runSweepBench } from './sweep.js';
import { runKeyLookupBench } from './key-lookup.js';
import { runClusterBench } from './cluster.js';

const sections: { title: string; run: () => Promise<void> }[] = [
  { title: 'IAPWS-IF97 steam properties', run: runSteamBench },
  { title: 'Single-effect evaporator', run: runSingleEffectBench },
  { title: 'Multiple-effect evaporator', run: runMultipleEffectBench },
  { title: 'Mechanical-vapour-recompression evaporator', run: runMechanicalVaporRecompressionBench },
  { title: 'Evaporator-scheme study', run: runSchemeStudyBench },
  { title: 'Overall heat-transfer coefficient estimate', run: runHeatTransferBench },
  {
    title: 'Metered API vs a bare Express route (autocannon, loopback)',
    run: async () => {
      await runApiBench();
    },
  },
  {
    title: 'API-key lookup: the synchronous SQLite path against the portable one',
    run: async () => {
      await runKeyLookupBench();
    },
  },
  {
    title: 'Metered route latency under anonymous password-hashing floods',
    run: async () => {
      await runHashFloodBench();
    },
  },
  {
    title: 'Calculation pool: crossover, latency under two large batches, throughput by threads',
    run: () => runPoolBench(),
  },
  {
    title: 'A 10 000-point single-effect sweep through the metered route, /healthz meanwhile',
    run: () => runSweepBench(),
  },
  {
    title: 'Three nodes behind HAProxy (PostgreSQL, Redis) against one node',
    run: async () => {
      await runClusterBench();
    },
  },
  { title: 'Console initial load (gzipped JS + CSS)', run: runBundleBench },
  { title: 'SIGTERM drain under keep-alive load (real server process)', run: runDrainBench },
];

console.log(
  `Ebullio benchmarks — node ${process.version}, ${os.cpus().length} × ${os.cpus()[0]?.model ?? 'cpu'}, load ${os
    .loadavg()
    .map((l) => l.toFixed(2))
    .join(' ')}`,
);
for (const section of sections) {
  console.log(`\n## ${section.title}`);
  await section.run();
}
