/** Contracts of the liquor routes: the model catalogue, boiling point, enthalpy and stored liquors. */
import { z } from 'zod';
import {
  atmosphericPressureField,
  CautionSchema,
  IdSchema,
  out,
  ProvenanceSchema,
  quantity,
  specs,
  WarningSchema,
} from './common.js';

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
    properties: z
      .object({
        heatCapacity: z.boolean(),
        density: z.boolean(),
        solubilityLimit: z.boolean(),
        viscosity: z
          .boolean()
          .meta({ description: 'Dynamic viscosity (shown in mPa·s where results give it)' }),
        thermalConductivity: z.boolean().meta({ description: 'Thermal conductivity, W/(m·K)' }),
        surfaceTension: z.boolean().meta({ description: 'Surface tension against its vapour, mN/m' }),
      })
      .meta({
        description:
          'Which optional properties the model provides. A heat-transfer estimate that needs a missing one says so.',
      }),
    transportValidity: z
      .object({
        density: ValidityBoxSchema.optional(),
        viscosity: ValidityBoxSchema.optional(),
        thermalConductivity: ValidityBoxSchema.optional(),
        surfaceTension: ValidityBoxSchema.optional(),
      })
      .meta({
        description:
          'Data range of the source of each property whose source differs from the model’s main one: silent inside, a model-extrapolated warning naming the property outside, refused beyond the limits',
      }),
    cautions: z.array(CautionSchema),
  })
  .meta({ id: 'Liquor' });
export type LiquorSummary = z.infer<typeof LiquorSummarySchema>;

export const LiquorListQuerySchema = z.object({
  kind: z.enum(['all', 'built-in', 'stored']).default('all').meta({
    description: 'Which liquors to list: built-in models, this account’s stored liquors, or both',
    example: 'built-in',
  }),
});

export const LiquorListSchema = z
  .object({ liquors: z.array(LiquorSummarySchema) })
  .meta({ id: 'LiquorList' });
export type LiquorList = z.infer<typeof LiquorListSchema>;

export const LiquorIdParamsSchema = z.object({
  liquorId: IdSchema.meta({
    description: 'Built-in liquor id or the id of a liquor stored by this account',
    example: 'sodium-hydroxide',
  }),
});

/** The same path parameter where only a stored liquor will do (deleting one). */
export const StoredLiquorIdParamsSchema = z.object({
  liquorId: IdSchema.meta({
    description: 'The id of a liquor stored by this account',
    example: 'north-mill-spent-wash',
  }),
});

const degC = (description: string) =>
  z
    .number()
    .gt(-273.15)
    .lt(2000)
    .meta({ description: `${description}, °C`, 'x-unit': 'degC' });
const massFractionNumber = z
  .number()
  .min(0)
  .lt(1)
  .meta({ description: 'Mass fraction of solute, 0 ≤ x < 1', 'x-unit': '1' });

/** One reading of a Dühring line: both boiling points at the same pressure. */
export const DuhringPointSchema = z
  .object({
    waterBoilingPoint: degC('Boiling point of pure water at the pressure of the reading'),
    solutionBoilingPoint: degC('Boiling point of the solution at that same pressure'),
  })
  .strict()
  .meta({ id: 'DuhringPoint' });

/** One Dühring line: the readings at one concentration (water boiling points increasing). */
export const DuhringLineSchema = z
  .object({
    massFraction: massFractionNumber,
    points: z.array(DuhringPointSchema).min(2).max(50),
  })
  .strict()
  .meta({ id: 'DuhringLine' });

export const PolynomialSchema = z
  .array(z.number())
  .min(1)
  .max(9)
  .meta({ description: 'Coefficients c0, c1, … (ascending powers) of Σ cᵢ·xⁱ in the mass fraction x' });

export const EnthalpyRowSchema = z
  .object({
    massFraction: massFractionNumber,
    points: z
      .array(
        z
          .object({
            temperature: degC('Temperature'),
            enthalpy: z
              .number()
              .meta({ description: 'Specific enthalpy, kJ/kg, steam-table datum', 'x-unit': 'kJ/kg' }),
          })
          .strict(),
      )
      .min(2)
      .max(50),
  })
  .strict()
  .meta({ id: 'EnthalpyRow' });

const Range01 = z
  .object({ min: z.number().min(0).max(1), max: z.number().min(0).max(1) })
  .strict()
  .refine((r) => r.min < r.max, { error: 'max must exceed min', path: ['max'] });
const RangeDegC = z
  .object({ min: degC('Lowest temperature'), max: degC('Highest temperature') })
  .strict()
  .refine((r) => r.min < r.max, { error: 'max must exceed min', path: ['max'] });

/**
 * `{"id": "sodium-hydroxide"}` is the likeliest first try at naming a liquor: say how it is named
 * instead of listing a custom definition's missing fields.
 */
function referenceByObjectHint(issue: z.core.$ZodRawIssue): string | undefined {
  if (issue.code !== 'unrecognized_keys') return undefined;
  const keys = (issue as { keys?: string[] }).keys ?? [];
  if (!keys.includes('id') && !keys.includes('stored')) return undefined;
  return LIQUOR_BY_ID_HINT;
}

const LIQUOR_BY_ID_HINT =
  'a built-in or stored liquor is named by its id as a plain string, e.g. "liquor": "sodium-hydroxide"; an object defines a custom liquor (name, boilingPoint or boilingPointRise, heatCapacity)';

/**
 * The messages the contracts give unknown fields that are likely mistakes: the validator lists them
 * first under the field they name, instead of "is not a field of this request".
 */
export const CONTRACT_FIELD_HINTS: ReadonlySet<string> = new Set([LIQUOR_BY_ID_HINT]);

export const CustomLiquorDefinitionSchema = z
  .object(
    {
      name: z.string().trim().min(1).max(100),
      compositionVariable: z.string().max(120).optional().meta({ example: 'dry-solids mass fraction' }),
      boilingPoint: z
        .object({ duhring: z.array(DuhringLineSchema).min(1).max(50) })
        .strict()
        .optional()
        .meta({
          description:
            'Dühring table (give this or boilingPointRise): per concentration (increasing), readings of water and solution boiling ' +
            'points at the same pressure. The solution boiling point is linear in that of water at each x (Dühring’s rule); ' +
            'the lines are interpolated in x, and towards pure water below the lowest concentration',
        }),
      boilingPointRise: z.object({ polynomial: PolynomialSchema }).strict().optional().meta({
        description:
          'Boiling-point rise in K as a polynomial in x, independent of pressure (give this or boilingPoint)',
      }),
      heatCapacity: z.object({ polynomial: PolynomialSchema }).strict().optional().meta({
        description:
          'Heat capacity in kJ/(kg·K) as a polynomial in x; enthalpy h = c_p(x)·(T − 0.01 °C) on the steam-table datum, heat of dilution neglected',
      }),
      enthalpy: z
        .object({ table: z.array(EnthalpyRowSchema).min(1).max(50) })
        .strict()
        .optional()
        .meta({
          description: 'Measured enthalpies per concentration, kJ/kg; replace the c_p-based enthalpy',
        }),
      density: z.object({ polynomial: PolynomialSchema }).strict().optional().meta({
        description:
          'Density in kg/m³ as a polynomial in x (optional; without it the liquor gives no density)',
      }),
      viscosity: z.object({ polynomial: PolynomialSchema }).strict().optional().meta({
        description:
          'Viscosity relative to pure water at the same temperature, μ/μ_water, as a polynomial in x (c0 = 1 for a liquor that tends to water); μ_water from IAPWS 2008. Optional: without it the liquor gives no viscosity',
      }),
      thermalConductivity: z.object({ polynomial: PolynomialSchema }).strict().optional().meta({
        description:
          'Thermal conductivity in W/(m·K) as a polynomial in x, independent of temperature (optional)',
      }),
      surfaceTension: z.object({ polynomial: PolynomialSchema }).strict().optional().meta({
        description: 'Surface tension in mN/m as a polynomial in x, independent of temperature (optional)',
      }),
      validity: z
        .object({ massFraction: Range01, temperature: RangeDegC.optional() })
        .strict()
        .optional()
        .meta({
          description:
            'Range of the data behind a polynomial definition (not for Dühring tables, whose range is the table)',
        }),
    },
    { error: referenceByObjectHint },
  )
  .strict()
  .superRefine((d, ctx) => {
    const given = (d.boilingPoint ? 1 : 0) + (d.boilingPointRise ? 1 : 0);
    if (given !== 1) {
      ctx.addIssue({
        code: 'custom',
        path: [given === 0 ? 'boilingPointRise' : 'boilingPoint'],
        message: 'give exactly one of boilingPoint (Dühring table) or boilingPointRise (polynomial)',
      });
    }
    if (d.boilingPoint && d.validity) {
      ctx.addIssue({
        code: 'custom',
        path: ['validity'],
        message: 'a Dühring table defines its own range; omit validity',
      });
    }
  })
  .meta({
    id: 'CustomLiquorDefinition',
    description:
      'A liquor defined by its own data: a boiling point (Dühring table) or boiling-point rise (polynomial), and a heat capacity or enthalpy table. Units: °C, kJ/kg, kJ/(kg·K), K for the rise.',
    example: {
      name: 'Tannery effluent concentrate (invented)',
      boilingPointRise: { polynomial: [0, 4.2, 18.5] },
      heatCapacity: { polynomial: [4.18, -2.6] },
      validity: { massFraction: { min: 0, max: 0.4 } },
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
    atmosphericPressure: atmosphericPressureField(),
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

/**
 * A stored liquor serves every calculation, the evaporators included, so it must say how its
 * enthalpy is found: a heat-capacity polynomial or an enthalpy table (an inline definition used
 * only for boiling points may omit both).
 */
function requireThermalData(input: { definition: CustomLiquorDefinition }, ctx: z.RefinementCtx): void {
  if (!input.definition.heatCapacity && !input.definition.enthalpy) {
    ctx.addIssue({
      code: 'custom',
      path: ['definition', 'heatCapacity'],
      message:
        'is required for a stored liquor (or give definition.enthalpy): evaporator calculations need its enthalpy',
    });
  }
}

const STORED_NEEDS =
  'A stored liquor must give definition.heatCapacity or definition.enthalpy besides its boiling point, as evaporator calculations need its enthalpy (422 otherwise).';

export const StoredLiquorCreateSchema = z
  .object({
    id: IdSchema.optional().meta({
      description: 'Id to store it under (default: the slug of the name); must not be a built-in id',
    }),
    definition: CustomLiquorDefinitionSchema,
  })
  .strict()
  .superRefine(requireThermalData)
  .meta({
    id: 'StoredLiquorCreate',
    description: STORED_NEEDS,
    example: {
      id: 'north-mill-spent-wash',
      definition: {
        name: 'North Mill spent wash (invented)',
        boilingPoint: {
          duhring: [
            {
              massFraction: 0.2,
              points: [
                { waterBoilingPoint: 50, solutionBoilingPoint: 51.2 },
                { waterBoilingPoint: 100, solutionBoilingPoint: 101.5 },
              ],
            },
            {
              massFraction: 0.45,
              points: [
                { waterBoilingPoint: 50, solutionBoilingPoint: 54.1 },
                { waterBoilingPoint: 100, solutionBoilingPoint: 105.0 },
              ],
            },
          ],
        },
        heatCapacity: { polynomial: [4.18, -2.4] },
      },
    },
  });
export type StoredLiquorCreate = z.infer<typeof StoredLiquorCreateSchema>;

export const StoredLiquorUpdateSchema = z
  .object({ definition: CustomLiquorDefinitionSchema })
  .strict()
  .superRefine(requireThermalData)
  .meta({
    id: 'StoredLiquorUpdate',
    description: `The new definition of a stored liquor; it is stored as the next version. ${STORED_NEEDS}`,
    example: {
      definition: {
        name: 'North Mill spent wash (invented), resampled',
        boilingPoint: {
          duhring: [
            {
              massFraction: 0.2,
              points: [
                { waterBoilingPoint: 50, solutionBoilingPoint: 51.4 },
                { waterBoilingPoint: 100, solutionBoilingPoint: 101.8 },
              ],
            },
            {
              massFraction: 0.45,
              points: [
                { waterBoilingPoint: 50, solutionBoilingPoint: 54.6 },
                { waterBoilingPoint: 100, solutionBoilingPoint: 105.6 },
              ],
            },
          ],
        },
        heatCapacity: { polynomial: [4.18, -2.5] },
      },
    },
  });
export type StoredLiquorUpdate = z.infer<typeof StoredLiquorUpdateSchema>;

export const StoredLiquorSchema = z
  .object({
    id: z.string(),
    name: z.string(),
    kind: z.literal('stored'),
    version: z.int().min(1).meta({
      description:
        'Version of the definition: 1 when stored, +1 with each update (PUT). Results that use the liquor name it in provenance',
      example: 1,
    }),
    definition: CustomLiquorDefinitionSchema,
    createdAt: z.string().meta({ description: 'When this version was stored (ISO 8601)' }),
  })
  .meta({ id: 'StoredLiquor' });
export type StoredLiquor = z.infer<typeof StoredLiquorSchema>;

export const StoredLiquorListSchema = z
  .object({ liquors: z.array(StoredLiquorSchema) })
  .meta({ id: 'StoredLiquorList' });
export type StoredLiquorList = z.infer<typeof StoredLiquorListSchema>;

/** Multipart form for a Dühring table uploaded as CSV (columns massFraction, waterBoilingPoint, solutionBoilingPoint). */
export const StoredLiquorUploadSchema = z
  .object({
    id: IdSchema.optional(),
    name: z.string().trim().min(1).max(120),
    heatCapacity: z.string().meta({
      description: 'Heat-capacity polynomial coefficients in kJ/(kg·K), comma-separated',
      example: '4.18,-2.4',
    }),
    file: z.string().meta({
      format: 'binary',
      description:
        'CSV with a header row massFraction,waterBoilingPoint,solutionBoilingPoint; cells are numbers in mass fraction and °C, or carry a unit ("10 %", "40 degC"); at most 1000 rows and 256 kB. Errors name `line N, column C` (the header is line 1)',
    }),
  })
  .meta({ id: 'StoredLiquorUpload' });

/** The form fields of an upload (the file is read apart), checked as the document states them. */
export const StoredLiquorUploadFieldsSchema = StoredLiquorUploadSchema.omit({ file: true }).strict();

/** An update by upload: the same form without an id (the path names the liquor). */
export const StoredLiquorUpdateUploadSchema = StoredLiquorUploadSchema.omit({ id: true }).meta({
  id: 'StoredLiquorUpdateUpload',
});

/** Highest number of rows in an uploaded Dühring table. */
export const MAX_DUHRING_ROWS = 1000;
/** Largest uploaded file, bytes. */
export const MAX_UPLOAD_BYTES = 256 * 1024;
