// The guard every calculation answer and batch row passes (server/http/send.ts): JSON
// turns NaN and ±Infinity into null without a word (ECMA-262 §25.5.2.2, SerializeJSONProperty),
// so a result holding one is refused, naming where the number sits.
import { describe, expect, it } from 'vitest';
import { findNonFinite } from '../../server/http/send.js';

describe('findNonFinite', () => {
  it('finds nothing in a clean result', () => {
    expect(findNonFinite({ a: 1, b: [2, { c: -3.5 }], d: 'x', e: null, f: true })).toBeUndefined();
  });

  it('names the path of the first non-finite number, in dotted and indexed form', () => {
    expect(findNonFinite({ steam: { massFlow: Number.NaN } })).toBe('steam.massFlow');
    expect(findNonFinite({ effects: [{ area: 1 }, { area: 2 }, { area: Infinity }] })).toBe(
      'effects[2].area',
    );
    expect(findNonFinite([[1, -Infinity]])).toBe('[0][1]');
    expect(findNonFinite({ a: [{ b: [0, Number.NaN] }] })).toBe('a[0].b[1]');
    expect(findNonFinite({ first: Number.NaN, second: Infinity })).toBe('first');
  });

  it('calls a bare non-finite number "(root)"', () => {
    expect(findNonFinite(Number.NaN)).toBe('(root)');
  });

  it('looks only at own properties, as JSON.stringify does', () => {
    const inherited = Object.create({ hidden: Number.NaN }) as Record<string, unknown>;
    inherited.shown = 1;
    expect(findNonFinite(inherited)).toBeUndefined();
  });
});
