// @vitest-environment node
// The console names operations by the catalogue's short titles (shared/operations.ts): every
// catalogued id has one, the new calculations among them, and an unknown id is shown as it is.
import { describe, expect, it } from 'vitest';
import { operationChoices, operationTitle } from '../../console/src/composables/operation-titles.js';
import { operationCatalogue } from '../../shared/operations.js';

describe('operation titles', () => {
  it('gives every catalogued operation a short title of its own', () => {
    const titles = Object.values(operationCatalogue).map((op) => operationTitle(op.id));
    expect(titles.every((t, i) => t !== Object.values(operationCatalogue)[i]!.id && t.length <= 30)).toBe(
      true,
    );
    expect(new Set(titles).size).toBe(titles.length);
  });

  it('names the recompression, study and heat-transfer operations', () => {
    expect(operationTitle('evaporators.mechanical-vapor-recompression')).toBe('MVR evaporator');
    expect(operationTitle('studies.evaporator-schemes')).toBe('Scheme study');
    expect(operationTitle('heat-transfer.overall-coefficient')).toBe('U estimate');
  });

  it('shows an id the catalogue does not know as it is, and filters by id', () => {
    expect(operationTitle('unmatched')).toBe('unmatched');
    expect(operationChoices(['batch', 'unmatched'])).toEqual([
      { title: 'Batch', value: 'batch' },
      { title: 'unmatched', value: 'unmatched' },
    ]);
  });
});
