/**
 * Console contracts: the liquor library (GET /console-api/liquors, GET /liquors/:id/charts,
 * POST /accounts/:id/liquors). Numbers in display units: °C, kJ/kg, kPa, mass fractions 0–1.
 */
import { z } from 'zod';
import { LiquorSummarySchema } from '../contracts/liquors.js';
import { CautionSchema } from '../contracts/common.js';
import { IdNumberSchema } from './accounts.js';

export const LiquorLibraryQuerySchema = z.object({
  accountId: IdNumberSchema.optional().meta({
    description: 'Only this account’s stored liquors (built-ins always)',
  }),
});

export const LiquorLibraryItemSchema = LiquorSummarySchema.extend({
  accountId: z.int().nullable().meta({ description: 'Owner of a stored liquor; null for built-in models' }),
  accountName: z.string().nullable(),
}).meta({ id: 'ConsoleLiquor' });
export type ConsoleLiquor = z.infer<typeof LiquorLibraryItemSchema>;

export const LiquorLibrarySchema = z
  .object({ items: z.array(LiquorLibraryItemSchema) })
  .meta({ id: 'ConsoleLiquorLibrary' });
export type ConsoleLiquorLibrary = z.infer<typeof LiquorLibrarySchema>;

export const LiquorChartParamsSchema = z.object({
  id: z
    .string()
    .min(1)
    .max(64)
    .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/),
});
export const LiquorChartQuerySchema = z.object({
  accountId: IdNumberSchema.optional().meta({
    description: 'Needed for a stored liquor: the owning account',
  }),
});

/** One computed point; `extrapolated` when the model warned it lies outside its data. */
export const DuhringChartPointSchema = z.object({
  waterBoilingPoint: z.number().meta({ 'x-unit': 'degC' }),
  solutionBoilingPoint: z.number().meta({ 'x-unit': 'degC' }),
  pressure: z.number().meta({ description: 'kPa absolute', 'x-unit': 'kPa' }),
  extrapolated: z.boolean(),
});
export const EnthalpyChartPointSchema = z.object({
  massFraction: z.number(),
  enthalpy: z.number().meta({ description: 'kJ/kg, steam-table datum', 'x-unit': 'kJ/kg' }),
  extrapolated: z.boolean(),
});

export const LiquorChartsSchema = z
  .object({
    liquor: LiquorLibraryItemSchema,
    duhring: z.object({
      description: z.string(),
      lines: z.array(z.object({ massFraction: z.number(), points: z.array(DuhringChartPointSchema) })),
    }),
    enthalpy: z.object({
      description: z.string(),
      curves: z.array(z.object({ temperature: z.number(), points: z.array(EnthalpyChartPointSchema) })),
    }),
    omittedPoints: z.int().meta({ description: 'Grid points beyond the model’s hard limits, left out' }),
    cautions: z.array(CautionSchema),
  })
  .meta({ id: 'ConsoleLiquorCharts' });
export type ConsoleLiquorCharts = z.infer<typeof LiquorChartsSchema>;

/**
 * POST /accounts/:id/liquors is multipart/form-data with these text fields and a CSV `file`
 * (header massFraction,waterBoilingPoint,solutionBoilingPoint; °C). Errors name `file:line N`.
 */
export const LiquorUploadFieldsSchema = z.object({
  name: z.string().trim().min(1).max(120),
  id: z
    .string()
    .min(1)
    .max(64)
    .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/)
    .optional(),
  heatCapacity: z
    .string()
    .min(1)
    .max(400)
    .meta({ description: 'Comma-separated polynomial coefficients of cp(x), kJ/(kg·K) (required)' }),
});
export type LiquorUploadFields = z.infer<typeof LiquorUploadFieldsSchema>;
