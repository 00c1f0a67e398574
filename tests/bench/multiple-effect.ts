/**
 * Benchmark: median time of one equal-area multiple-effect design on an invented caustic train
 * (10 kg/s of 10 % sodium hydroxide at 60 °C concentrated to 30 %, backward feed, steam at
 * 1.0 MPa, last effect at 15 kPa; U falling from 2800 to 1300 W/(m²·K) along the train), for 3 and
 * 6 effects. Target: median ≤ 0.3 ms for 6 effects on a 2-core machine (with the lean IF97 core;
 * it was < 5 ms before).
 * Run alone with `npx tsx tests/bench/multiple-effect.ts`.
 */
import { pathToFileURL } from 'node:url';
import {
  solveMultipleEffect,
  type MultipleEffectInput,
} from '../../server/engine/evaporators/multiple-effect.js';
import { sodiumHydroxide } from '../../server/engine/liquors/sodium-hydroxide.js';

const C = 273.15;

function benchInput(effects: number): MultipleEffectInput {
  const u = Array.from({ length: effects }, (_, i) => 2800 - (1500 * i) / Math.max(1, effects - 1));
  return {
    mode: 'equal-area',
    liquor: sodiumHydroxide,
    feed: { massFlow: 10, massFraction: 0.1, temperature: 60 + C },
    productMassFraction: 0.3,
    steam: { pressure: 1.0e6 },
    lastEffectPressure: 15e3,
    overallHeatTransferCoefficients: u,
    feedArrangement: 'backward',
  };
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? (s[m] as number) : ((s[m - 1] as number) + (s[m] as number)) / 2;
}

export async function runMultipleEffectBench(): Promise<void> {
  for (const n of [3, 6]) {
    const input = benchInput(n);
    let iterations = 0;
    for (let i = 0; i < 50; i++) iterations = solveMultipleEffect(input).iterations; // warm-up (JIT)
    const times: number[] = [];
    const t0 = performance.now();
    while (times.length < 300 || performance.now() - t0 < 1000) {
      const a = performance.now();
      solveMultipleEffect(input);
      times.push(performance.now() - a);
      if (times.length >= 5000) break;
    }
    const med = median(times);
    console.log(
      `multiple-effect ${n}-effect equal-area design (NaOH, backward feed): median ${med.toFixed(3)} ms per solve, ` +
        `${Math.round(1000 / med)} solves/s, ${iterations} iterations, ${times.length} runs` +
        (n === 6 ? ' (target ≤ 0.3 ms)' : ''),
    );
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await runMultipleEffectBench();
}
