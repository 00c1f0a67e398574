/**
 * Liquors stored by an account: POST /v1/stored-liquors (a JSON definition, or a Dühring table
 * uploaded as CSV in multipart/form-data), GET /v1/stored-liquors, DELETE /v1/stored-liquors/{liquorId}.
 * A stored id can be used as `liquor` in every calculation and in /v1/liquors/{liquorId}/….
 *
 * Definitions are stored as given (display units, shape of CustomLiquorDefinitionSchema) and
 * checked by building the engine model before they are stored, so a stored liquor always builds.
 */
import { parse as parseCsv } from 'csv-parse/sync';
import { and, asc, eq } from 'drizzle-orm';
import type { RequestHandler } from 'express';
import {
  CustomLiquorDefinitionSchema,
  StoredLiquorIdParamsSchema,
  MAX_DUHRING_ROWS,
  StoredLiquorCreateSchema,
  type CustomLiquorDefinition,
  type StoredLiquor,
} from '../../../shared/contracts/index.js';
import type { Db } from '../../db/client.js';
import { storedLiquors } from '../../db/schema.js';
import { slugify } from '../../engine/liquors/custom.js';
import { findBuiltInLiquor } from '../../engine/liquors/registry.js';
import { requireOperation } from '../middleware/operation.js';
import { problem, type ProblemFieldError } from '../problem.js';
import { validate } from '../validation.js';
import { buildCustomLiquor } from './liquors.js';
import type { V1RouteModule } from './module.js';
import { multipartOnly } from '../upload.js';

export interface StoredLiquorRecord {
  /** Database row id: never reused, so it identifies this exact definition (internal only). */
  rowId: number;
  id: string;
  name: string;
  definition: CustomLiquorDefinition;
  createdAt: Date;
}

function toRecord(row: typeof storedLiquors.$inferSelect): StoredLiquorRecord {
  return {
    rowId: row.id,
    id: row.liquorId,
    name: row.name,
    definition: CustomLiquorDefinitionSchema.parse(row.definition),
    createdAt: row.createdAt,
  };
}

export function findStoredLiquor(
  db: Db,
  accountId: number,
  liquorId: string,
): StoredLiquorRecord | undefined {
  const row = db
    .select()
    .from(storedLiquors)
    .where(and(eq(storedLiquors.accountId, accountId), eq(storedLiquors.liquorId, liquorId)))
    .get();
  return row ? toRecord(row) : undefined;
}

export function listStoredLiquors(db: Db, accountId: number): StoredLiquorRecord[] {
  return db
    .select()
    .from(storedLiquors)
    .where(eq(storedLiquors.accountId, accountId))
    .orderBy(asc(storedLiquors.liquorId))
    .all()
    .map(toRecord);
}

function view(r: StoredLiquorRecord): StoredLiquor {
  return {
    id: r.id,
    name: r.name,
    kind: 'stored',
    definition: r.definition,
    createdAt: r.createdAt.toISOString(),
  };
}

const CSV_COLUMNS = ['massFraction', 'waterBoilingPoint', 'solutionBoilingPoint'] as const;

/**
 * A Dühring table from CSV text: a header row naming the three columns (any order), then one
 * reading per line. Rows are grouped by mass fraction. Every bad row is reported by line number.
 */
export function duhringFromCsv(
  text: string,
  field = 'file',
): NonNullable<CustomLiquorDefinition['boilingPoint']> {
  let records: string[][];
  try {
    records = parseCsv(text, {
      skip_empty_lines: true,
      trim: true,
      relax_column_count: true,
      bom: true,
    }) as string[][];
  } catch (err) {
    throw problem('validation-failed', `The CSV could not be read: ${(err as Error).message}`, {
      errors: [{ field, message: (err as Error).message }],
    });
  }
  const header = records[0];
  if (!header) {
    throw problem('validation-failed', 'The CSV is empty.', {
      errors: [{ field, message: 'no header row' }],
    });
  }
  const index = CSV_COLUMNS.map((c) => header.indexOf(c));
  const missing = CSV_COLUMNS.filter((_, i) => index[i] === -1);
  if (missing.length > 0) {
    throw problem('validation-failed', `The CSV header lacks ${missing.join(', ')}.`, {
      errors: [
        {
          field: `${field}:line 1`,
          message: `header must name ${CSV_COLUMNS.join(', ')}`,
          value: header.join(','),
        },
      ],
    });
  }
  if (records.length - 1 > MAX_DUHRING_ROWS) {
    throw problem(
      'payload-too-large',
      `The table has ${records.length - 1} rows; at most ${MAX_DUHRING_ROWS} are accepted.`,
    );
  }
  const errors: ProblemFieldError[] = [];
  const lines = new Map<number, { waterBoilingPoint: number; solutionBoilingPoint: number }[]>();
  records.slice(1).forEach((row, i) => {
    const line = i + 2;
    const values = index.map((k) => Number(row[k] ?? ''));
    const bad = CSV_COLUMNS.filter(
      (_, j) => !Number.isFinite(values[j]) || (row[index[j]!] ?? '').trim() === '',
    );
    if (bad.length > 0) {
      errors.push({
        field: `${field}:line ${line}`,
        message: `not a number: ${bad.join(', ')}`,
        value: row.join(','),
      });
      return;
    }
    const [x, tw, ts] = values as [number, number, number];
    if (!(x >= 0 && x < 1)) {
      errors.push({
        field: `${field}:line ${line}`,
        message: 'massFraction must be at least 0 and below 1',
        value: x,
        validRange: { min: 0, max: 1, unit: '1' },
      });
      return;
    }
    const points = lines.get(x) ?? [];
    points.push({ waterBoilingPoint: tw, solutionBoilingPoint: ts });
    lines.set(x, points);
  });
  if (errors.length > 0) {
    throw problem('validation-failed', `${errors.length} row(s) of the CSV are not valid.`, {
      errors: errors.slice(0, 100),
    });
  }
  if (lines.size === 0) {
    throw problem('validation-failed', 'The CSV has no data rows.', {
      errors: [{ field, message: 'no data rows' }],
    });
  }
  return {
    duhring: [...lines.entries()]
      .sort((a, b) => a[0] - b[0])
      .map(([massFraction, points]) => ({
        massFraction,
        points: points.sort((a, b) => a.waterBoilingPoint - b.waterBoilingPoint),
      })),
  };
}

function coefficients(text: unknown, field: string): number[] {
  const parts = typeof text === 'string' ? text.split(/[,;\s]+/).filter(Boolean) : [];
  const values = parts.map(Number);
  if (values.length === 0 || values.some((v) => !Number.isFinite(v))) {
    throw problem('validation-failed', `${field} must be comma-separated numbers`, {
      errors: [{ field, message: 'must be comma-separated numbers, e.g. "4.18,-2.4"', value: text }],
    });
  }
  return values;
}

/** The create request from JSON or from a multipart upload. */
function createInput(req: Parameters<RequestHandler>[0]): {
  id?: string;
  definition: CustomLiquorDefinition;
} {
  if (req.is('multipart/form-data')) {
    const body = (req.body ?? {}) as Record<string, unknown>;
    if (!req.file) {
      throw problem('validation-failed', 'The upload needs a CSV file in the field "file".', {
        errors: [{ field: 'file', message: 'is required' }],
      });
    }
    const boilingPoint = duhringFromCsv(req.file.buffer.toString('utf8'));
    const heat =
      body.heatCapacity === undefined ? undefined : coefficients(body.heatCapacity, 'heatCapacity');
    return validate(StoredLiquorCreateSchema, {
      ...(body.id !== undefined ? { id: body.id } : {}),
      definition: { name: body.name, boilingPoint, ...(heat ? { heatCapacity: { polynomial: heat } } : {}) },
    });
  }
  return validate(StoredLiquorCreateSchema, req.body);
}

export const storedLiquorRoutes: V1RouteModule = {
  register(router, deps) {
    router.get('/stored-liquors', requireOperation('liquors.stored.list'), (_req, res) => {
      res.json({ liquors: listStoredLiquors(deps.db, res.locals.auth!.accountId).map(view) });
    });

    router.post(
      '/stored-liquors',
      requireOperation('liquors.stored.create'),
      multipartOnly({ fieldSize: 4096 }),
      (req, res) => {
        const accountId = res.locals.auth!.accountId;
        const input = createInput(req);
        const id = input.id ?? slugify(input.definition.name);
        if (!/^[a-z0-9]+(?:-[a-z0-9]+)*$/.test(id)) {
          throw problem('validation-failed', 'The name gives no usable id; give an id.', {
            errors: [{ field: 'id', message: 'is required when the name has no letters or digits' }],
          });
        }
        if (findBuiltInLiquor(id) || findStoredLiquor(deps.db, accountId, id)) {
          throw problem(
            'conflict',
            `A liquor with the id "${id}" exists already; choose another id or delete the stored one first.`,
            { errors: [{ field: 'id', message: 'is taken', value: id }] },
          );
        }
        buildCustomLiquor(input.definition, 'definition', id); // refuses a definition the engine cannot use
        const createdAt = deps.clock();
        const row = deps.db
          .insert(storedLiquors)
          .values({
            accountId,
            liquorId: id,
            name: input.definition.name,
            definition: input.definition,
            createdAt,
          })
          .returning()
          .get();
        res
          .status(201)
          .location(`/v1/liquors/${id}`)
          .json(view(toRecord(row)));
      },
    );

    router.delete('/stored-liquors/:liquorId', requireOperation('liquors.stored.delete'), (req, res) => {
      const { liquorId } = validate(StoredLiquorIdParamsSchema, req.params);
      const result = deps.db
        .delete(storedLiquors)
        .where(
          and(eq(storedLiquors.accountId, res.locals.auth!.accountId), eq(storedLiquors.liquorId, liquorId)),
        )
        .run();
      if (result.changes === 0) {
        throw problem(
          'not-found',
          findBuiltInLiquor(liquorId)
            ? `"${liquorId}" is a built-in liquor; it cannot be deleted.`
            : `This account has no stored liquor "${liquorId}".`,
        );
      }
      res.status(204).end();
    });
  },
};
