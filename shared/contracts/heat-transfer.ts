/**
 * Contract of the heat-transfer estimate: the overall coefficient U of an evaporator tube (liquor
 * inside, steam condensing outside) from film coefficients, wall and fouling, referred to the
 * outside area of the tubes.
 */
import { z } from 'zod';
import { atmosphericPressureField, ProvenanceSchema, quantity, specs } from './common.js';
import { SteamSpecSchema } from './evaporators.js';
import {
  EVAPORATOR_TYPES,
  exactlyOne,
  FoulingSchema,
  heatTransferBreakdownShape,
  LiquorPropertiesSchema,
  refineEstimateFlow,
  TubeFlowSchema,
  TubeSchema,
} from './heat-transfer-estimate.js';
import { LiquorRefSchema } from './liquors.js';

export * from './heat-transfer-estimate.js';

export const OverallCoefficientRequestSchema = z
  .object({
    evaporatorType: z.enum(EVAPORATOR_TYPES).meta({
      description:
        'falling-film (Chun & Seban), forced-circulation (no boiling in the tubes; Dittus–Boelter) or natural-circulation (approximate: Dittus–Boelter at an assumed velocity combined with Mostinski nucleate boiling)',
      example: 'falling-film',
    }),
    liquor: LiquorRefSchema,
    massFraction: quantity(
      specs.massFraction,
      'Mass fraction of the liquor in the tubes (its representative state)',
      0.035,
    ),
    boilingTemperature: quantity(
      specs.temperature,
      'Boiling temperature of the liquor in the tubes (give this or bodyPressure)',
      undefined,
    ).optional(),
    bodyPressure: quantity(
      specs.pressure,
      'Pressure in the body (give this or boilingTemperature)',
      31,
    ).optional(),
    steam: SteamSpecSchema,
    tube: TubeSchema,
    flow: TubeFlowSchema,
    fouling: FoulingSchema.optional(),
    liquorProperties: LiquorPropertiesSchema.optional(),
    atmosphericPressure: atmosphericPressureField(),
  })
  .strict()
  .superRefine((r, ctx) => {
    exactlyOne(ctx, r, ['boilingTemperature', 'bodyPressure'], [], 'the liquor state');
    if (r.steam.superheat !== undefined || r.steam.condensateSubcooling !== undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['steam', r.steam.superheat !== undefined ? 'superheat' : 'condensateSubcooling'],
        message: 'the estimate takes saturated steam; omit superheat and condensateSubcooling',
      });
    }
    refineEstimateFlow(r, ctx);
  })
  .meta({
    id: 'OverallCoefficientRequest',
    description:
      'The liquor boils (or is heated) inside vertical tubes; the heating steam condenses outside them. Give the liquor state by boilingTemperature or bodyPressure, the steam by pressure or temperature.',
  });
export type OverallCoefficientRequest = z.infer<typeof OverallCoefficientRequestSchema>;

export const OverallCoefficientResponseSchema = z
  .object({ ...heatTransferBreakdownShape, provenance: ProvenanceSchema })
  .meta({ id: 'OverallCoefficientResponse' });
export type OverallCoefficientResponse = z.infer<typeof OverallCoefficientResponseSchema>;
