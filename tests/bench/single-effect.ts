/**
 * Benchmark: median time of one single-effect design solve on an invented caustic concentrator
 * (a 20 % → 45 % caustic-like liquor, 3 kg/s feed at 45 °C, body at 15 kPa, steam at 350 kPa).
 * Target: median ≤ 8 µs (with the lean IF97 core; it was < 50 µs before). Run alone with
 * `npx tsx tests/bench/single-effect.ts`.
 *
 * The liquor is the sodium-hydroxide model when it is present in server/engine/liquors, otherwise
 * a stand-in with a polynomial BPR and enthalpy (same cost profile: no IF97 state calls).
 */
import { pathToFileURL } from 'node:url';
import {
  designSingleEffect,
  type SingleEffectDesignInput,
} from '../../server/engine/evaporators/single-effect.js';
import type { LiquorModel } from '../../server/engine/liquors/model.js';
import { saturationTemperature } from '../../server/engine/steam/if97.js';

async function benchLiquor(): Promise<{ liquor: LiquorModel; label: string }> {
  try {
    const mod = (await import('../../server/engine/liquors/sodium-hydroxide.js')) as {
      sodiumHydroxide: LiquorModel;
    };
    return { liquor: mod.sodiumHydroxide, label: 'sodium-hydroxide model' };
  } catch {
    const box = { massFraction: { min: 0, max: 0.6 }, temperature: { min: 273.15, max: 473.15 } };
    const bpr = (x: number) => 18 * x + 95 * x * x;
    return {
      label: 'polynomial stand-in liquor',
      liquor: {
        id: 'bench-caustic-like',
        name: 'bench caustic-like liquor',
        kind: 'custom',
        compositionVariable: 'mass fraction of solute',
        validity: box,
        limits: box,
        sources: [],
        cautions: [],
        boilingPoint: (x, p) => saturationTemperature(p) + bpr(x),
        boilingPointRise: (x) => bpr(x),
        enthalpy: (x, t) => (4180 - 2200 * x) * (t - 273.16) + 3e5 * x * x,
      },
    };
  }
}

export async function runSingleEffectBench(): Promise<void> {
  const { liquor, label } = await benchLiquor();
  const input: SingleEffectDesignInput = {
    liquor,
    feed: { massFlow: 3, massFraction: 0.2, temperature: 318.15 },
    product: { massFraction: 0.45 },
    steam: { pressure: 350e3 },
    body: { pressure: 15e3, overallHeatTransferCoefficient: 1700 },
  };
  let sink = 0;
  for (let i = 0; i < 5000; i++) sink += designSingleEffect(input).area; // warm-up (JIT)
  const batches = 200;
  const perBatch = 100;
  const times: number[] = [];
  for (let b = 0; b < batches; b++) {
    const t0 = process.hrtime.bigint();
    for (let i = 0; i < perBatch; i++) sink += designSingleEffect(input).area;
    times.push(Number(process.hrtime.bigint() - t0) / 1e3 / perBatch);
  }
  times.sort((a, b) => a - b);
  const median = times[Math.floor(times.length / 2)] ?? NaN;
  const p90 = times[Math.floor(times.length * 0.9)] ?? NaN;
  console.log(
    `single-effect design (${label}): median ${median.toFixed(2)} µs/solve, p90 ${p90.toFixed(2)} µs, ` +
      `${Math.round(1e6 / median).toLocaleString('en')} solves/s (target ≤ 8 µs)` +
      (sink > 0 ? '' : ' [no result]'),
  );
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await runSingleEffectBench();
}
