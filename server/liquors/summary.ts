/** The public description of a liquor model in display units (the /v1 catalogue and the console). */
import type { LiquorSummary } from '../../shared/contracts/index.js';
import { describeLiquor, type LiquorModel, type ValidityBox } from '../engine/liquors/model.js';
import { display, r } from '../http/output.js';

function boxOut(box: ValidityBox): LiquorSummary['validity'] {
  return {
    massFraction: { min: r(box.massFraction.min), max: r(box.massFraction.max) },
    temperature: {
      min: display(box.temperature.min, 'temperature'),
      max: display(box.temperature.max, 'temperature'),
    },
    ...(box.pressure
      ? {
          pressure: {
            min: display(box.pressure.min, 'pressure'),
            max: display(box.pressure.max, 'pressure'),
          },
        }
      : {}),
    ...(box.notes ? { notes: box.notes } : {}),
  };
}

/** The public description of a model in display units. */
export function summarise(model: LiquorModel, kind: LiquorSummary['kind'], id = model.id): LiquorSummary {
  const d = describeLiquor(model);
  return {
    id,
    name: d.name,
    kind,
    compositionVariable: d.compositionVariable,
    validity: boxOut(d.validity),
    limits: boxOut(d.limits),
    sources: d.sources,
    properties: d.properties,
    transportValidity: Object.fromEntries(
      Object.entries(d.transportValidity).map(([property, box]) => [property, boxOut(box)]),
    ),
    cautions: model.cautions,
  };
}
