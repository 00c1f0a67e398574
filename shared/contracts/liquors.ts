/** Contracts of the liquor routes: the model catalogue, boiling point, enthalpy and stored liquors. */
import { z } from 'zod';
import { CautionSchema, IdSchema, out, ProvenanceSchema, quantity, specs, WarningSchema } from './common.js';

const Interval = z.object({ min: z.number(), max: z.number() });

export const ValidityBoxSchema = z
  .object({
    massFraction: Interval.meta({ description: 'Mass fraction of solute, 0–1', 'x-unit': '1' }),
    temperature: Interval.meta({ description: 'Temperature, °C', 'x-unit': 'degC' }),
    pressure: Interval.optional().meta({ description: 'Pressure, kPa absolute', 'x-unit': 'kPa' }),
    notes: z.array(z.string()).optional(),
  })
  .meta({ id: 'ValidityBox', description: 'Where a liquor model applies, in display units.' });

export const CitationSchema = z
  .object({
    key: z.string().meta({ example: 'olsson-1997' }),
    reference: z.string().meta({ description: 'Authors, title, journal, volume, year' }),
  })
  .meta({ id: 'Citation' });

export const LiquorSummarySchema = z
  .object({
    id: z.string().meta({ example: 'sodium-hydroxide' }),
    name: z.string(),
    kind: z
      .enum(['built-in', 'stored'])
      .meta({ description: 'built-in model, or liquor data stored by this account' }),
    compositionVariable: z.string().meta({ example: 'mass fraction of NaOH' }),
    validity: ValidityBoxSchema.meta({ description: 'Data range of the source: silent inside' }),
    limits: ValidityBoxSchema.meta({
      description: 'Hard limits: out-of-range beyond, a warning between validity and limits',
    }),
    sources: z.array(CitationSchema),
    properties: z.object({ heatCapacity: z.boolean(), density: z.boolean(), solubilityLimit: z.boolean() }),
    cautions: z.array(CautionSchema),
  })
  .meta({ id: 'Liquor' });
export type LiquorSummary = z.infer<typeof LiquorSummarySchema>;

export const LiquorListQuerySchema = z.object({
  kind: z
    .enum(['all', 'built-in', 'stored'])
    .default('all')
    .meta({ description: 'Which liquors to list: built-in models, this account’s stored liquors, or both' }),
});

export const LiquorListSchema = z
  .object({ liquors: z.array(LiquorSummarySchema) })
  .meta({ id: 'LiquorList' });
export type LiquorList = z.infer<typeof LiquorListSchema>;

export const LiquorIdParamsSchema = z.object({
  id: IdSchema.meta({
    description: 'Built-in liquor id or the id of a liquor stored by this account',
    example: 'sodium-hydroxide',
  }),
});

/** One measured point of a Dühring table: the solution and pure water boiling at the same pressure. */
export const DuhringPointSchema = z
  .object({
    massFraction: z
      .number()
      .min(0)
      .lt(1)
      .meta({ description: 'Mass fraction of solute, 0–1', 'x-unit': '1' }),
    waterBoilingPoint: z
      .number()
      .gt(0)
      .lt(374)
      .meta({
        description: 'Boiling point of pure water at the pressure of the measurement, °C',
        'x-unit': 'degC',
      }),
    solutionBoilingPoint: z
      .number()
      .gt(0)
      .lt(500)
      .meta({ description: 'Boiling point of the solution at that same pressure, °C', 'x-unit': 'degC' }),
  })
  .meta({ id: 'DuhringPoint' });

export const PolynomialSchema = z
  .array(z.number())
  .min(1)
  .max(8)
  .meta({ description: 'Coefficients c0, c1, … of Σ cᵢ·xⁱ in the mass fraction x' });

export const BoilingPointRiseDefinitionSchema = z.union([
  z
    .object({ polynomial: PolynomialSchema })
    .strict()
    .meta({ description: 'Boiling-point rise in K as a polynomial in x, independent of pressure' }),
  z
    .object({ duhring: z.array(DuhringPointSchema).min(2).max(1000) })
    .strict()
    .meta({
      description:
        "Dühring table: at each mass fraction at least two points; the solution's boiling point is taken as " +
        'linear in the water boiling point at each mass fraction (Dühring’s rule) and the lines are interpolated in x',
    }),
]);

export const HeatCapacityDefinitionSchema = z
  .object({ polynomial: PolynomialSchema })
  .strict()
  .meta({
    description: 'Isobaric heat capacity in kJ/(kg·K) as a polynomial in x, independent of temperature',
  });

export const CustomLiquorDefinitionSchema = z
  .object({
    name: z.string().trim().min(1).max(120),
    compositionVariable: z
      .string()
      .max(120)
      .optional()
      .meta({ example: 'mass fraction of dissolved solids' }),
    massFractionRange: z
      .object({ min: z.number().min(0).max(1), max: z.number().min(0).max(1) })
      .refine((r) => r.min < r.max, { error: 'min must be below max', path: ['max'] })
      .optional()
      .meta({
        description: 'Mass fraction range of the data (default: that of the Dühring table, or 0–0.5)',
      }),
    boilingPointRise: BoilingPointRiseDefinitionSchema,
    heatCapacity: HeatCapacityDefinitionSchema,
  })
  .strict()
  .meta({
    id: 'CustomLiquorDefinition',
    description:
      'A liquor defined by its own data: a boiling-point rise (polynomial or Dühring table) and a heat capacity.',
    example: {
      name: 'Tannery effluent concentrate (invented)',
      boilingPointRise: { polynomial: [0, 4.2, 18.5] },
      heatCapacity: { polynomial: [4.18, -2.6] },
    },
  });
export type CustomLiquorDefinition = z.infer<typeof CustomLiquorDefinitionSchema>;

export const LiquorRefSchema = z
  .union([
    IdSchema.meta({
      description: 'A built-in liquor id or the id of a liquor stored by this account',
      example: 'sodium-hydroxide',
    }),
    CustomLiquorDefinitionSchema,
  ])
  .meta({
    id: 'LiquorRef',
    description: 'The liquor: a built-in id, a stored liquor id, or an inline definition.',
  });
export type LiquorRef = z.infer<typeof LiquorRefSchema>;

export const BoilingPointRequestSchema = z
  .object({
    massFraction: quantity(specs.massFraction, 'Mass fraction of solute', 0.3),
    pressure: quantity(specs.pressure, 'Pressure over the liquor', '150 mbar'),
  })
  .strict()
  .meta({ id: 'BoilingPointRequest', example: { massFraction: 0.3, pressure: 15 } });
export type BoilingPointRequest = z.infer<typeof BoilingPointRequestSchema>;

export const BoilingPointResponseSchema = z
  .object({
    boilingPoint: out('temperature', 'Boiling point of the solution'),
    waterBoilingPoint: out('temperature', 'Boiling point of pure water at the same pressure (IAPWS-IF97)'),
    boilingPointRise: out('temperatureDifference', 'Boiling-point rise'),
    warnings: z.array(WarningSchema),
    cautions: z.array(CautionSchema),
    provenance: ProvenanceSchema,
  })
  .meta({ id: 'BoilingPointResponse' });
export type BoilingPointResponse = z.infer<typeof BoilingPointResponseSchema>;

export const EnthalpyRequestSchema = z
  .object({
    massFraction: quantity(specs.massFraction, 'Mass fraction of solute', 0.3),
    temperature: quantity(specs.temperature, 'Temperature of the solution', 60),
  })
  .strict()
  .meta({ id: 'EnthalpyRequest', example: { massFraction: 0.3, temperature: 60 } });
export type EnthalpyRequest = z.infer<typeof EnthalpyRequestSchema>;

export const EnthalpyResponseSchema = z
  .object({
    enthalpy: out(
      'specificEnthalpy',
      'Specific enthalpy, steam-table datum (liquid water at the triple point = 0)',
    ),
    heatCapacity: out(
      'specificHeatCapacity',
      'Isobaric specific heat capacity, where the model gives it',
    ).optional(),
    warnings: z.array(WarningSchema),
    cautions: z.array(CautionSchema),
    provenance: ProvenanceSchema,
  })
  .meta({ id: 'EnthalpyResponse' });
export type EnthalpyResponse = z.infer<typeof EnthalpyResponseSchema>;

export const StoredLiquorCreateSchema = CustomLiquorDefinitionSchema.extend({
  id: IdSchema.optional().meta({
    description: 'Id to store it under (default: from the name); must not be a built-in id',
  }),
})
  .strict()
  .meta({
    id: 'StoredLiquorCreate',
    example: {
      id: 'north-mill-spent-wash',
      name: 'North Mill spent wash (invented)',
      boilingPointRise: {
        duhring: [
          { massFraction: 0.2, waterBoilingPoint: 50, solutionBoilingPoint: 51.2 },
          { massFraction: 0.2, waterBoilingPoint: 100, solutionBoilingPoint: 101.5 },
          { massFraction: 0.45, waterBoilingPoint: 50, solutionBoilingPoint: 54.1 },
          { massFraction: 0.45, waterBoilingPoint: 100, solutionBoilingPoint: 105.0 },
        ],
      },
      heatCapacity: { polynomial: [4.18, -2.4] },
    },
  });
export type StoredLiquorCreate = z.infer<typeof StoredLiquorCreateSchema>;

export const StoredLiquorSchema = z
  .object({
    id: z.string(),
    name: z.string(),
    kind: z.literal('stored'),
    definition: CustomLiquorDefinitionSchema,
    createdAt: z.string().meta({ description: 'ISO 8601 time stamp' }),
  })
  .meta({ id: 'StoredLiquor' });
export type StoredLiquor = z.infer<typeof StoredLiquorSchema>;

/** Multipart form for a Dühring table uploaded as CSV (columns massFraction, waterBoilingPoint, solutionBoilingPoint). */
export const StoredLiquorUploadSchema = z
  .object({
    id: IdSchema.optional(),
    name: z.string().trim().min(1).max(120),
    heatCapacity: z
      .string()
      .meta({
        description: 'Heat-capacity polynomial coefficients in kJ/(kg·K), comma-separated',
        example: '4.18,-2.4',
      }),
    file: z.string().meta({
      format: 'binary',
      description:
        'CSV with a header row massFraction,waterBoilingPoint,solutionBoilingPoint (°C); at most 1000 rows and 256 kB',
    }),
  })
  .meta({ id: 'StoredLiquorUpload' });

/** Highest number of rows in an uploaded Dühring table. */
export const MAX_DUHRING_ROWS = 1000;
/** Largest uploaded file, bytes. */
export const MAX_UPLOAD_BYTES = 256 * 1024;
