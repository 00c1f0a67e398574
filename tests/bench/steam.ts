/**
 * Steam benchmark: IF97 throughput of Ebullio's adapter, and its ratio to Debian python3-iapws on
 * the same points (same count, medians over repeats). Run alone: `npx tsx tests/bench/steam.ts`.
 *
 * Targets of the lean core (regions 1, 2 and 4): h(p, T) in each of regions 1 and 2 and saturated
 * h_f + h_g at ≥ 2 million per second, and the lean h(p, T) ≥ 150× python3-iapws on the same points.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import {
  enthalpyAtPT,
  saturatedLiquidEnthalpy,
  saturatedVaporEnthalpy,
  saturationAtPressure,
  saturationEnthalpies,
  saturationTemperature,
  stateAtPT,
} from '../../server/engine/steam/if97.js';

const PYTHON = '/usr/bin/python3';
const REPEATS = 7;

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] ?? NaN;
}

/** Median seconds per call of fn over the points, after a warm-up pass. */
function timePerCall<T>(points: T[], fn: (p: T) => number, repeats = REPEATS): number {
  let sink = 0;
  for (const p of points) sink += fn(p);
  const times: number[] = [];
  for (let r = 0; r < repeats; r++) {
    const t0 = process.hrtime.bigint();
    for (const p of points) sink += fn(p);
    times.push(Number(process.hrtime.bigint() - t0) / 1e9);
  }
  if (!Number.isFinite(sink)) throw new Error('benchmark produced a non-finite result');
  return median(times) / points.length;
}

/** Deterministic points: evaporator-range pressures and liquid/vapour temperatures. */
function makePoints(n: number): { pt: [number, number][]; sat: number[] } {
  const pt: [number, number][] = [];
  const sat: number[] = [];
  for (let i = 0; i < n; i++) {
    const p = 5e3 * Math.pow(2e6 / 5e3, (i % 97) / 96); // 5 kPa … 2 MPa
    sat.push(p);
    const tSat = saturationTemperature(p);
    pt.push([p, i % 2 === 0 ? tSat - 5 : tSat + 10]); // subcooled liquid / superheated vapour
  }
  return { pt, sat };
}

function ensureIapws(): void {
  if (spawnSync(PYTHON, ['-c', 'import iapws']).status === 0) return;
  console.log('python3-iapws missing: apt-get install -y python3-iapws');
  execFileSync('apt-get', ['install', '-y', 'python3-iapws'], { stdio: 'inherit' });
}

export async function runSteamBench(): Promise<void> {
  const { pt, sat } = makePoints(2000);
  const fmt = (perCall: number): string => Math.round(1 / perCall).toLocaleString('en-US');

  const tsat = timePerCall(sat, (p) => saturationTemperature(p));
  const satFull = timePerCall(sat, (p) => saturationAtPressure(p).latentHeat);
  const satLean = timePerCall(sat, (p) => {
    const s = saturationEnthalpies(p);
    return s.vapor - s.liquid;
  });
  const ptFull = timePerCall(pt, ([p, t]) => stateAtPT(p, t).enthalpy);
  const ptLean = timePerCall(pt, ([p, t]) => enthalpyAtPT(p, t));
  const liquidPoints = pt.filter((_, i) => i % 2 === 0);
  const vaporPoints = pt.filter((_, i) => i % 2 === 1);
  const ptRegion1 = timePerCall(liquidPoints, ([p, t]) => enthalpyAtPT(p, t));
  const ptRegion2 = timePerCall(vaporPoints, ([p, t]) => enthalpyAtPT(p, t));
  const satPair = timePerCall(sat, (p) => saturatedVaporEnthalpy(p) - saturatedLiquidEnthalpy(p));
  const target = (perCall: number, perSecond: number): string =>
    1 / perCall >= perSecond ? 'target met' : 'TARGET MISSED';

  console.log(`IF97 T_sat(p): ${fmt(tsat)} /s`);
  console.log(`IF97 full saturation properties (liquid + vapour states with transport): ${fmt(satFull)} /s`);
  console.log(
    `IF97 saturated h_f and h_g (saturationEnthalpies, one call for both): ${fmt(satLean)} /s (target ≥ 2,000,000: ${target(satLean, 2e6)})`,
  );
  console.log(
    `IF97 saturated h_f and h_g (saturatedLiquidEnthalpy + saturatedVaporEnthalpy): ${fmt(satPair)} pairs/s (target ≥ 2,000,000: ${target(satPair, 2e6)})`,
  );
  console.log(`IF97 (p, T) states with transport properties: ${fmt(ptFull)} /s`);
  console.log(`IF97 h(p, T) (lean path, regions 1 and 2 alternating): ${fmt(ptLean)} /s`);
  console.log(
    `IF97 h(p, T) region 1 (subcooled liquid): ${fmt(ptRegion1)} /s (target ≥ 2,000,000: ${target(ptRegion1, 2e6)})`,
  );
  console.log(
    `IF97 h(p, T) region 2 (superheated vapour): ${fmt(ptRegion2)} /s (target ≥ 2,000,000: ${target(ptRegion2, 2e6)})`,
  );

  ensureIapws();
  const script = fileURLToPath(new URL('./steam_iapws_timing.py', import.meta.url));
  const out = execFileSync(PYTHON, [script], {
    input: JSON.stringify({ pt, sat, repeats: 5 }),
    encoding: 'utf8',
    maxBuffer: 1 << 20,
  });
  const py = JSON.parse(out.trim()) as { ptSeconds: number; satSeconds: number };
  console.log(
    `Steam-state throughput vs python3-iapws, same ${pt.length} (p, T) points: ${(py.ptSeconds / ptFull).toFixed(1)}× (full states), ${(py.ptSeconds / ptLean).toFixed(1)}× (lean h); saturation: ${(py.satSeconds / satFull).toFixed(1)}× (full), ${(py.satSeconds / satLean).toFixed(1)}× (lean); target ≥ 150× for the lean paths`,
  );
}

if (import.meta.url === `file://${process.argv[1]}`) {
  await runSteamBench();
}
