/**
 * Benchmark: median time of one mechanical-vapour-recompression design solve on an invented
 * seawater distiller (20 kg/s of 42 g/kg seawater at 58 °C to 70 g/kg, body at 20 kPa, ΔT 5 K,
 * η_s = 0.75), and of a three-stage case (discharge 2.5 × suction at 1.4 per stage).
 * Target: median ≤ 100 µs per solve. Run alone with
 * `npx tsx tests/bench/mechanical-vapor-recompression.ts`.
 */
import { pathToFileURL } from 'node:url';
import {
  designMechanicalVaporRecompression,
  type MechanicalVaporRecompressionInput,
} from '../../server/engine/evaporators/mechanical-vapor-recompression.js';
import { seawater } from '../../server/engine/liquors/seawater.js';

function median(input: MechanicalVaporRecompressionInput): { median: number; p90: number; sink: number } {
  let sink = 0;
  for (let i = 0; i < 3000; i++) sink += designMechanicalVaporRecompression(input).area; // warm-up (JIT)
  const batches = 200;
  const perBatch = 50;
  const times: number[] = [];
  for (let b = 0; b < batches; b++) {
    const t0 = process.hrtime.bigint();
    for (let i = 0; i < perBatch; i++) sink += designMechanicalVaporRecompression(input).area;
    times.push(Number(process.hrtime.bigint() - t0) / 1e3 / perBatch);
  }
  times.sort((a, b) => a - b);
  return {
    median: times[Math.floor(times.length / 2)] ?? NaN,
    p90: times[Math.floor(times.length * 0.9)] ?? NaN,
    sink,
  };
}

export async function runMechanicalVaporRecompressionBench(): Promise<void> {
  const base: MechanicalVaporRecompressionInput = {
    liquor: seawater,
    feed: { massFlow: 20, massFraction: 0.042, temperature: 331.15 },
    product: { massFraction: 0.07 },
    body: { pressure: 20e3, overallHeatTransferCoefficient: 2400, temperatureDifference: 5 },
    compressor: { isentropicEfficiency: 0.75 },
  };
  const cases: [string, MechanicalVaporRecompressionInput][] = [
    ['one stage', base],
    [
      'three stages',
      {
        ...base,
        body: { pressure: 20e3, overallHeatTransferCoefficient: 2400 },
        compressor: { isentropicEfficiency: 0.75, dischargePressure: 50e3 },
      },
    ],
  ];
  for (const [label, input] of cases) {
    const m = median(input);
    console.log(
      `mechanical-vapor-recompression design (seawater, ${label}): median ${m.median.toFixed(2)} µs/solve, ` +
        `p90 ${m.p90.toFixed(2)} µs, ${Math.round(1e6 / m.median).toLocaleString('en')} solves/s (target ≤ 100 µs)` +
        (m.sink > 0 ? '' : ' [no result]'),
    );
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await runMechanicalVaporRecompressionBench();
}
