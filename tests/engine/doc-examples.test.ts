/**
 * The `@example` lines of the engine's doc comments are executed: each is read from the source
 * text, its call is evaluated against the module's exports and the result is compared with the
 * value the comment states. The stated values were computed with the code and, where the comment
 * names one, agree with the source's own table (IAPWS R7-97(2012), R12-08 and R15-11 check
 * tables, python3-iapws fixtures, handbook tables); that comparison is the comment's, this test
 * keeps the code and its documentation from drifting apart.
 *
 * Format: `@example name(1, 2.5).property // ≈ 0.52 K (any note)` with numeric arguments only.
 * Tolerance rule:
 * - `→ v`: the result rounds to v at the stated digits (|result − v| ≤ ½ unit of the last digit);
 * - `≈ v`: the result lies within one unit of the last stated digit of v.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import * as mechanicalVaporRecompression from '../../server/engine/evaporators/mechanical-vapor-recompression.js';
import * as figuresOfMerit from '../../server/engine/evaporators/figures-of-merit.js';
import * as thermocompressor from '../../server/engine/evaporators/thermocompressor.js';
import * as heatTransfer from '../../server/engine/heat-transfer/correlations.js';
import * as kraftBlackLiquor from '../../server/engine/liquors/kraft-black-liquor.js';
import * as seawater from '../../server/engine/liquors/seawater.js';
import * as sodiumHydroxide from '../../server/engine/liquors/sodium-hydroxide.js';
import * as sucrose from '../../server/engine/liquors/sucrose.js';
import * as if97 from '../../server/engine/steam/if97.js';
import * as evaporatorSchemes from '../../server/engine/studies/evaporator-schemes.js';

const ENGINE = fileURLToPath(new URL('../../server/engine/', import.meta.url));

/** The modules whose every exported function is a correlation (or steam-property) function. */
const CORRELATION_MODULES: Record<string, Record<string, unknown>> = {
  'evaporators/mechanical-vapor-recompression.ts': mechanicalVaporRecompression,
  'evaporators/figures-of-merit.ts': figuresOfMerit,
  'evaporators/thermocompressor.ts': thermocompressor,
  'heat-transfer/correlations.ts': heatTransfer,
  'liquors/kraft-black-liquor.ts': kraftBlackLiquor,
  'liquors/seawater.ts': seawater,
  'liquors/sodium-hydroxide.ts': sodiumHydroxide,
  'liquors/sucrose.ts': sucrose,
  'steam/if97.ts': if97,
  'studies/evaporator-schemes.ts': evaporatorSchemes,
};

/** Exported functions that compute no property, so need no example. */
const NOT_CORRELATIONS: Record<string, readonly string[]> = {
  'steam/if97.ts': ['if97CitationFor'], // builds a citation record
  // whole-evaporator solvers and their balance check (tested against the fixture, not by an example)
  'evaporators/mechanical-vapor-recompression.ts': [
    'mechanicalVaporRecompression',
    'designMechanicalVaporRecompression',
    'rateMechanicalVaporRecompression',
    'mechanicalVaporRecompressionBalances',
    'mechanicalVaporRecompressionFiguresOfMerit', // assembles the figures from a result
  ],
  // take and return records (figures, prices, a study), not numbers; tested in tests/engine/studies/
  'studies/evaporator-schemes.ts': ['candidateCosts', 'runSchemeStudy'],
  'evaporators/figures-of-merit.ts': ['figuresOfMerit'], // assembles the figures from a result
  'evaporators/thermocompressor.ts': ['requireWorkingEjector', 'checkThermocompressor'], // checks
};

interface Example {
  file: string;
  text: string;
  fn: string;
  args: number[];
  path: string[];
  marker: '≈' | '→';
  stated: string;
}

const NUMBER = /^-?\d+(?:\.\d+)?(?:e[+-]?\d+)?$/i;

function engineFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((d) =>
    d.isDirectory() ? engineFiles(join(dir, d.name)) : d.name.endsWith('.ts') ? [join(dir, d.name)] : [],
  );
}

/** Parses one `@example` line; throws with the line when it does not follow the format. */
function parseExample(file: string, text: string): Example {
  const m = /^([A-Za-z_$][\w$]*)\(([^()]*)\)((?:\.[A-Za-z_$][\w$]*)*)\s*\/\/(.*)$/.exec(text);
  if (!m) throw new Error(`${file}: @example is not "name(args) // ≈ value": ${text}`);
  const [, fn, argText, pathText, comment] = m as unknown as [string, string, string, string, string];
  const args = argText.trim() === '' ? [] : argText.split(',').map((a) => a.trim());
  for (const a of args) {
    if (!NUMBER.test(a)) throw new Error(`${file}: @example argument "${a}" is not a number: ${text}`);
  }
  const v = /(≈|→)\s*(-?\d+(?:\.\d+)?(?:e[+-]?\d+)?)/i.exec(comment);
  if (!v) throw new Error(`${file}: @example states no "≈ value" or "→ value": ${text}`);
  return {
    file,
    text,
    fn,
    args: args.map(Number),
    path: pathText.split('.').filter(Boolean),
    marker: v[1] as '≈' | '→',
    stated: v[2] as string,
  };
}

/** One unit of the last stated digit: 0.52 → 0.01, 8.897351e-4 → 1e-10, 4186.8 → 0.1. */
function lastDigitUnit(stated: string): number {
  const m = /^-?\d+(?:\.(\d+))?(?:e([+-]?\d+))?$/i.exec(stated);
  if (!m) throw new Error(`not a number: ${stated}`);
  const decimals = m[1]?.length ?? 0;
  const exponent = m[2] ? Number(m[2]) : 0;
  return 10 ** (exponent - decimals);
}

function tolerance(example: Pick<Example, 'marker' | 'stated'>): number {
  const unit = lastDigitUnit(example.stated);
  // 1e-9 of a unit absorbs the binary representation of the stated decimal itself
  return (example.marker === '→' ? 0.5 : 1) * unit * (1 + 1e-9);
}

function evaluate(example: Example): number {
  const module = CORRELATION_MODULES[example.file];
  if (!module) throw new Error(`${example.file}: add the module to CORRELATION_MODULES`);
  const fn = module[example.fn];
  if (typeof fn !== 'function') throw new Error(`${example.file} exports no function ${example.fn}`);
  let value: unknown = (fn as (...a: number[]) => unknown)(...example.args);
  for (const key of example.path) value = (value as Record<string, unknown>)[key];
  if (typeof value !== 'number') throw new Error(`${example.text} gave ${String(value)}, not a number`);
  return value;
}

const examples: Example[] = engineFiles(ENGINE).flatMap((path) => {
  const file = relative(ENGINE, path).split('\\').join('/');
  return readFileSync(path, 'utf8')
    .split('\n')
    .map((line) => /^\s*\*\s*@example\s+(.*?)\s*$/.exec(line)?.[1])
    .filter((text): text is string => text !== undefined)
    .map((text) => parseExample(file, text));
});

describe('engine doc-comment examples', () => {
  it('reads ≈ as one unit of the last stated digit and → as half a unit', () => {
    expect(lastDigitUnit('0.52')).toBeCloseTo(0.01, 15);
    expect(lastDigitUnit('4186.8')).toBeCloseTo(0.1, 15);
    expect(lastDigitUnit('-11186')).toBe(1);
    expect(lastDigitUnit('8.897351e-4')).toBeCloseTo(1e-10, 20);
    expect(tolerance({ marker: '≈', stated: '0.52' })).toBeCloseTo(0.01, 9);
    expect(tolerance({ marker: '→', stated: '372.755919' })).toBeCloseTo(5e-7, 12);
  });

  it('finds the examples in the engine source', () => {
    // one per exported correlation at least (counted below); guards against a parser that reads nothing
    expect(examples.length).toBeGreaterThanOrEqual(39);
  });

  it('gives every exported correlation of the liquor and steam modules an executed example', () => {
    const missing: string[] = [];
    for (const [file, module] of Object.entries(CORRELATION_MODULES)) {
      const skip = NOT_CORRELATIONS[file] ?? [];
      for (const [name, value] of Object.entries(module)) {
        if (typeof value !== 'function' || skip.includes(name)) continue;
        if (!examples.some((e) => e.file === file && e.fn === name)) missing.push(`${file}: ${name}`);
      }
    }
    expect(missing).toEqual([]);
  });

  it.each(examples.map((e) => [`${e.file}: ${e.text}`, e] as const))('%s', (_title, example) => {
    const value = evaluate(example);
    const stated = Number(example.stated);
    expect(Number.isFinite(value)).toBe(true);
    expect(Math.abs(value - stated)).toBeLessThanOrEqual(tolerance(example));
  });
});
