/**
 * Console routes for the liquor library: GET /liquors (built-in models and every account's
 * stored liquors, validity boxes in display units), GET /liquors/:id/charts (Dühring lines and
 * enthalpy–concentration curves computed by the engine), POST /accounts/:id/liquors (a Dühring
 * table uploaded as CSV, multipart/form-data, errors by line number; the v1 CSV parser).
 *
 * Chart points come from the liquor model itself on a grid across its validity box (mass fraction:
 * on to its hard limit). A point the
 * model refuses (beyond its hard limits) is left out and counted in `omittedPoints`; a point it
 * answers with a "model-extrapolated" warning is kept and flagged `extrapolated`. No NaN is sent.
 */
import type { RequestHandler } from 'express';
import { StoredLiquorCreateSchema } from '../../shared/contracts/liquors.js';
import { AccountIdParamsSchema } from '../../shared/console/accounts.js';
import {
  LiquorChartParamsSchema,
  LiquorChartQuerySchema,
  LiquorChartsSchema,
  LiquorLibraryItemSchema,
  LiquorLibraryQuerySchema,
  LiquorLibrarySchema,
  LiquorUploadFieldsSchema,
  type ConsoleLiquor,
  type ConsoleLiquorCharts,
} from '../../shared/console/liquors.js';
import { slugify, TEMPERATURE_MARGIN } from '../engine/liquors/custom.js';
import type { LiquorModel } from '../engine/liquors/model.js';
import { builtInLiquors, findBuiltInLiquor } from '../engine/liquors/registry.js';
import { saturationPressure } from '../engine/steam/if97.js';
import { KELVIN_OFFSET, type EngineWarning } from '../engine/types.js';
import type { AppDeps } from '../deps.js';
import { problem } from '../http/problem.js';
import {
  buildCustomLiquor,
  duhringFromCsv,
  inCsvTerms,
  findStoredLiquor,
  insertStoredLiquor,
  listStoredLiquorsWithAccounts,
  storedLiquorExists,
  summarise,
} from '../liquors/index.js';
import { r } from '../http/output.js';
import { validate } from '../http/validate.js';
import { formatOutput } from '../units/index.js';
import { singleCsvUpload } from '../http/upload.js';
import { requireAccount } from './accounts.js';
import { recordAudit } from '../accounts/audit.js';
import { consoleRoute, type ConsoleRouteModule } from './route.js';

/** Lowest and highest water temperatures the IF97 saturation line covers, K (IAPWS R7-97 region 4). */
const IF97_T_MIN = 273.16;
const IF97_T_MAX = 647.0;

/** About this many intervals between Dühring lines, enthalpy curves, and points along a curve. */
export const DUHRING_INTERVALS = 8;
export const ENTHALPY_INTERVALS = 10;
export const ENTHALPY_POINT_INTERVALS = 20;

const NICE_STEPS = [
  0.001, 0.002, 0.005, 0.01, 0.02, 0.025, 0.05, 0.1, 0.2, 0.25, 0.5, 1, 2, 5, 10, 20, 25, 50, 100,
];

/**
 * Round-number values from min to max with at most about `intervals` steps; the ends are
 * always included (so the grid spans the whole validity box), rounded to 6 decimals.
 */
export function niceGrid(min: number, max: number, intervals: number): number[] {
  if (!(max > min)) return [min];
  const step = NICE_STEPS.find((s) => (max - min) / s <= intervals) ?? (max - min) / intervals;
  const out: number[] = [];
  for (let i = Math.ceil(min / step - 1e-9); i * step <= max + 1e-9; i++) out.push(i * step);
  if (out.length === 0 || out[0]! - min > 1e-9) out.unshift(min);
  if (max - out[out.length - 1]! > 1e-9) out.push(max);
  return out.map((v) => Math.round(v * 1e6) / 1e6);
}

/**
 * The mass fractions to chart: across the validity box and on to the hard limit, so the part a
 * model answers with a "model-extrapolated" warning is drawn too (dashed by the console) instead
 * of the chart stopping where the data end; the validity edge is always one of the values.
 */
export function massFractionGrid(model: LiquorModel, intervals: number): number[] {
  const valid = model.validity.massFraction;
  const max = Math.max(valid.max, model.limits.massFraction.max);
  const grid = niceGrid(valid.min, max, intervals);
  if (!grid.some((x) => Math.abs(x - valid.max) < 1e-9)) grid.push(valid.max);
  return grid.sort((a, b) => a - b);
}

const degC = (kelvin: number) => r(formatOutput(kelvin, 'temperature'));

/** Runs one model evaluation: the value (or undefined when refused) and whether it extrapolated. */
function evaluate(run: (w: EngineWarning[]) => number): { value: number; extrapolated: boolean } | undefined {
  const warnings: EngineWarning[] = [];
  try {
    const value = run(warnings);
    if (!Number.isFinite(value)) return undefined;
    return { value, extrapolated: warnings.some((w) => w.code === 'model-extrapolated') };
  } catch {
    return undefined;
  }
}

/** Dühring lines and enthalpy–concentration curves of a model, display units. */
export function liquorChartData(model: LiquorModel): Omit<ConsoleLiquorCharts, 'liquor' | 'cautions'> {
  const box = model.validity;
  let omitted = 0;

  const twMin = Math.max(box.temperature.min, IF97_T_MIN) - KELVIN_OFFSET;
  const twMax = Math.min(box.temperature.max, IF97_T_MAX) - KELVIN_OFFSET;
  const waterTemps = niceGrid(twMin, twMax, 12);
  const lines = massFractionGrid(model, DUHRING_INTERVALS).map((x) => {
    const points: ConsoleLiquorCharts['duhring']['lines'][number]['points'] = [];
    for (const twC of waterTemps) {
      const p = saturationPressure(twC + KELVIN_OFFSET);
      const out = evaluate((w) => model.boilingPoint(x, p, w));
      if (!out) {
        omitted++;
        continue;
      }
      points.push({
        waterBoilingPoint: twC,
        solutionBoilingPoint: degC(out.value),
        pressure: r(formatOutput(p, 'pressure')),
        extrapolated: out.extrapolated,
      });
    }
    return { massFraction: x, points };
  });

  const temps = niceGrid(
    box.temperature.min - KELVIN_OFFSET,
    box.temperature.max - KELVIN_OFFSET,
    ENTHALPY_INTERVALS,
  );
  const fractions = massFractionGrid(model, ENTHALPY_POINT_INTERVALS);
  const curves = temps.map((tC) => {
    const points: ConsoleLiquorCharts['enthalpy']['curves'][number]['points'] = [];
    for (const x of fractions) {
      const out = evaluate((w) => model.enthalpy(x, tC + KELVIN_OFFSET, w));
      if (!out) {
        omitted++;
        continue;
      }
      points.push({
        massFraction: x,
        enthalpy: r(formatOutput(out.value, 'specificEnthalpy')),
        extrapolated: out.extrapolated,
      });
    }
    return { temperature: tC, points };
  });

  return {
    duhring: {
      description:
        'Boiling point of the solution against that of pure water at the same pressure (IAPWS-IF97 saturation), °C; one line per mass fraction.',
      lines,
    },
    enthalpy: {
      description:
        'Specific enthalpy of the solution, kJ/kg (steam-table datum: liquid water at the triple point), against mass fraction; one curve per temperature, °C.',
      curves,
    },
    omittedPoints: omitted,
  };
}

function libraryItem(
  model: LiquorModel,
  kind: ConsoleLiquor['kind'],
  id: string,
  account: { id: number; name: string } | null,
): ConsoleLiquor {
  return {
    ...summarise(model, kind, id),
    accountId: account?.id ?? null,
    accountName: account?.name ?? null,
  };
}

/**
 * A stored Dühring table described by its own readings: the temperatures it spans in °C (the
 * model's generic liquid range, 0–350 °C, says nothing about the table) and a note in °C.
 * Limits: the table's span widened by the model's margin of extrapolation.
 */
export function describeStoredTable(item: ConsoleLiquor, definition: unknown): ConsoleLiquor {
  const duhring = (definition as { boilingPoint?: { duhring?: unknown } } | null)?.boilingPoint?.duhring;
  if (!Array.isArray(duhring)) return item;
  const water: number[] = [];
  const solution: number[] = [];
  for (const line of duhring as {
    points?: { waterBoilingPoint?: unknown; solutionBoilingPoint?: unknown }[];
  }[]) {
    for (const p of line.points ?? []) {
      if (typeof p.waterBoilingPoint === 'number') water.push(p.waterBoilingPoint);
      if (typeof p.solutionBoilingPoint === 'number') solution.push(p.solutionBoilingPoint);
    }
  }
  if (water.length === 0 || solution.length === 0) return item;
  const all = [...water, ...solution];
  const span = { min: Math.min(...all), max: Math.max(...all) };
  const c = (v: number) => String(r(v));
  const note = `Dühring table: ${duhring.length} concentration(s), water boiling points ${c(Math.min(...water))}–${c(Math.max(...water))} °C, solution boiling points ${c(Math.min(...solution))}–${c(Math.max(...solution))} °C. At a given x the pressure range checked is the one shared by the two lines around it, with a ${TEMPERATURE_MARGIN} K margin of extrapolation.`;
  return {
    ...item,
    validity: {
      ...item.validity,
      temperature: span,
      notes: [note, ...(item.validity.notes ?? []).filter((n) => !n.startsWith('Dühring table:'))],
    },
    limits: {
      ...item.limits,
      temperature: {
        min: Math.max(item.limits.temperature.min, span.min - TEMPERATURE_MARGIN),
        max: Math.min(item.limits.temperature.max, span.max + TEMPERATURE_MARGIN),
      },
    },
  };
}

async function storedItems(deps: AppDeps, accountId: number | undefined): Promise<ConsoleLiquor[]> {
  const stored = await listStoredLiquorsWithAccounts(deps.store, accountId);
  return stored.map(({ record, accountId, accountName }) => {
    const model = buildCustomLiquor(record.definition, 'definition', record.id);
    return describeStoredTable(
      libraryItem(model, 'stored', record.id, { id: accountId, name: accountName }),
      record.definition,
    );
  });
}

/** multipart/form-data only (415 otherwise); multer's errors as problems (413 for size). */
const readUpload = singleCsvUpload({ fieldSize: 4096 });
const multipartUpload: RequestHandler = (req, res, next) => {
  if (!req.is('multipart/form-data')) {
    return next(
      problem('unsupported-media-type', 'Upload the Dühring table as multipart/form-data with a CSV "file".'),
    );
  }
  readUpload(req, res).then(() => next(), next);
};

function heatCapacityCoefficients(text: string): number[] {
  const values = text
    .split(/[,;\s]+/)
    .filter(Boolean)
    .map(Number);
  if (values.length === 0 || values.some((v) => !Number.isFinite(v))) {
    throw problem('validation-failed', 'heatCapacity must be comma-separated numbers.', {
      errors: [
        { field: 'heatCapacity', message: 'must be comma-separated numbers, e.g. "4.18,-2.4"', value: text },
      ],
    });
  }
  return values;
}

export const liquorRoutes: ConsoleRouteModule = {
  register(router, deps) {
    consoleRoute(router, {
      method: 'get',
      path: '/liquors',
      roles: ['admin', 'billing'],
      summary: 'The liquor library: built-in models and the liquors stored by accounts',
      request: { query: LiquorLibraryQuerySchema },
      response: LiquorLibrarySchema,
      handler: async ({ query }) => {
        if (query.accountId !== undefined) await requireAccount(deps.store, query.accountId);
        const items = [...builtInLiquors.values()].map((m) => libraryItem(m, 'built-in', m.id, null));
        items.push(...(await storedItems(deps, query.accountId)));
        return { items };
      },
    });

    consoleRoute(router, {
      method: 'get',
      path: '/liquors/:id/charts',
      roles: ['admin', 'billing'],
      summary: 'Dühring lines and enthalpy–concentration curves of a liquor, computed by the engine',
      request: { params: LiquorChartParamsSchema, query: LiquorChartQuerySchema },
      response: LiquorChartsSchema,
      handler: async ({ params, query }) => {
        let model: LiquorModel;
        let item: ConsoleLiquor;
        const builtIn = findBuiltInLiquor(params.id);
        if (builtIn) {
          model = builtIn;
          item = libraryItem(model, 'built-in', params.id, null);
        } else {
          if (query.accountId === undefined) {
            throw problem(
              'not-found',
              `"${params.id}" is not a built-in liquor; give the accountId of a stored one.`,
              {
                errors: [{ field: 'query.accountId', message: 'is required for a stored liquor' }],
              },
            );
          }
          const account = await requireAccount(deps.store, query.accountId);
          const stored = await findStoredLiquor(deps.store, account.id, params.id);
          if (!stored)
            throw problem('not-found', `Account ${account.id} has no stored liquor "${params.id}".`);
          model = buildCustomLiquor(stored.definition, 'definition', stored.id);
          item = describeStoredTable(libraryItem(model, 'stored', stored.id, account), stored.definition);
        }
        return { liquor: item, ...liquorChartData(model), cautions: model.cautions };
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/accounts/:id/liquors',
      roles: ['admin'],
      summary: 'Store a liquor for an account from a Dühring table (CSV upload, multipart/form-data)',
      description:
        'Fields: file (CSV with header massFraction,waterBoilingPoint,solutionBoilingPoint: numbers in mass fraction and °C, or with a unit such as "10 %" or "40 degC"), name, id (optional), heatCapacity (required coefficients, kJ/(kg·K)). Errors name "line N, column C" (the header is line 1).',
      tag: 'liquors',
      request: { params: AccountIdParamsSchema, bodyContentType: 'multipart/form-data' },
      middleware: [multipartUpload],
      response: LiquorLibraryItemSchema,
      status: 201,
      handler: async ({ req, res, params }) => {
        const account = await requireAccount(deps.store, params.id);
        const fields = validate(LiquorUploadFieldsSchema, req.body ?? {});
        if (!req.file) {
          throw problem('validation-failed', 'The upload needs a CSV file in the field "file".', {
            errors: [{ field: 'file', message: 'is required' }],
          });
        }
        // A stored liquor serves the evaporators too, so its heat capacity is required (as on /v1).
        if (fields.heatCapacity === undefined) {
          throw problem('validation-failed', 'heatCapacity is required for a stored liquor.', {
            errors: [
              {
                field: 'heatCapacity',
                message: 'is required: evaporator calculations need the liquor’s heat capacity',
              },
            ],
          });
        }
        const heat = heatCapacityCoefficients(fields.heatCapacity);
        const upload = duhringFromCsv(req.file.buffer.toString('utf8'));
        const boilingPoint = upload.boilingPoint;
        let input;
        try {
          input = validate(StoredLiquorCreateSchema, {
            ...(fields.id !== undefined ? { id: fields.id } : {}),
            definition: { name: fields.name, boilingPoint, heatCapacity: { polynomial: heat } },
          });
        } catch (err) {
          // A refusal names the CSV line and column, not a JSON path.
          throw inCsvTerms(err, upload);
        }
        const id = input.id ?? slugify(input.definition.name);
        if (!/^[a-z0-9]+(?:-[a-z0-9]+)*$/.test(id)) {
          throw problem('validation-failed', 'The name gives no usable id; give an id.', {
            errors: [{ field: 'id', message: 'is required when the name has no letters or digits' }],
          });
        }
        if (findBuiltInLiquor(id) || (await storedLiquorExists(deps.store, account.id, id))) {
          throw problem(
            'conflict',
            `A liquor with the id "${id}" exists already for this account; choose another id.`,
            {
              errors: [{ field: 'id', message: 'is taken', value: id }],
            },
          );
        }
        let model;
        try {
          model = buildCustomLiquor(input.definition, 'definition', id);
        } catch (err) {
          throw inCsvTerms(err, upload);
        }
        await insertStoredLiquor(deps.store, account.id, id, input.definition, deps.clock());
        await recordAudit(deps, req, res, {
          action: 'liquor.upload',
          targetType: 'stored-liquor',
          targetId: `${account.id}/${id}`,
          detail: { accountId: account.id, liquorId: id, lines: boilingPoint.duhring.length },
        });
        res.location(`/console-api/liquors/${id}/charts?accountId=${account.id}`);
        return describeStoredTable(libraryItem(model, 'stored', id, account), input.definition);
      },
    });
  },
};
