/**
 * Liquors stored by an account: create (a JSON definition, or a Dühring table uploaded as CSV in
 * multipart/form-data), list and delete. A stored id can be used as `liquor` in every calculation
 * and in /v1/liquors/{liquorId}/…. The stored-liquor repository is in server/liquors.
 */
import type { Request } from 'express';
import {
  StoredLiquorCreateSchema,
  StoredLiquorIdParamsSchema,
  StoredLiquorListSchema,
  StoredLiquorSchema,
  StoredLiquorUploadSchema,
  type CustomLiquorDefinition,
} from '../../../../shared/contracts/index.js';
import { operationCatalogue } from '../../../../shared/operations.js';
import { slugify } from '../../../engine/liquors/custom.js';
import { findBuiltInLiquor } from '../../../engine/liquors/registry.js';
import {
  buildCustomLiquor,
  coefficientsField,
  deleteStoredLiquor,
  duhringFromCsv,
  findStoredLiquor,
  insertStoredLiquor,
  listStoredLiquors,
  storedLiquorView,
} from '../../../liquors/index.js';
import { problem } from '../../problem.js';
import { multipartOnly } from '../../upload.js';
import { validate } from '../../validate.js';
import { declareOperation, pathOf } from '../operation.js';
import { liquorGet } from './liquors.js';

/** The create request from JSON or from a multipart upload. */
function createInput(req: Request): { id?: string; definition: CustomLiquorDefinition } {
  if (req.is('multipart/form-data')) {
    const body = (req.body ?? {}) as Record<string, unknown>;
    if (!req.file) {
      throw problem('validation-failed', 'The upload needs a CSV file in the field "file".', {
        errors: [{ field: 'file', message: 'is required' }],
      });
    }
    const boilingPoint = duhringFromCsv(req.file.buffer.toString('utf8'));
    const heat =
      body.heatCapacity === undefined ? undefined : coefficientsField(body.heatCapacity, 'heatCapacity');
    return validate(StoredLiquorCreateSchema, {
      ...(body.id !== undefined ? { id: body.id } : {}),
      definition: { name: body.name, boilingPoint, ...(heat ? { heatCapacity: { polynomial: heat } } : {}) },
    });
  }
  return validate(StoredLiquorCreateSchema, req.body);
}

const listExample = {
  liquors: [
    {
      id: 'north-mill-spent-wash',
      name: 'North Mill spent wash (invented)',
      kind: 'stored',
      definition: (StoredLiquorCreateSchema.meta() as { example: { definition: unknown } }).example
        .definition,
      createdAt: '2026-11-30T08:15:00.000Z',
    },
  ],
};

export const storedLiquorCreate = declareOperation({
  operation: operationCatalogue.storedLiquorCreate,
  method: 'post',
  path: '/v1/stored-liquors',
  openApiName: 'createStoredLiquor',
  tag: 'Liquors',
  summary:
    'Store a liquor of your own (JSON definition, or a Dühring table uploaded as CSV in multipart/form-data)',
  description:
    'Bad CSV rows are reported by line number in the problem’s `errors` (field `file:line 7`). ' +
    'The stored id can then be used as `liquor` in any calculation.',
  request: {
    body: StoredLiquorCreateSchema,
    upload: StoredLiquorUploadSchema,
    example: { name: 'spent-wash', summary: 'Dühring table of an invented spent wash at North Mill' },
  },
  response: { status: 201, description: 'Stored', schema: StoredLiquorSchema },
  problems: {
    409: 'A liquor with this id exists (type conflict)',
    413: 'The upload is too large (type payload-too-large)',
  },
  middleware: [multipartOnly({ fieldSize: 4096 })],
  // JSON or multipart: the body is read here, not by the generic parser.
  handle: (req, res, ctx) => {
    const input = createInput(req);
    const id = input.id ?? slugify(input.definition.name);
    if (!/^[a-z0-9]+(?:-[a-z0-9]+)*$/.test(id)) {
      throw problem('validation-failed', 'The name gives no usable id; give an id.', {
        errors: [{ field: 'id', message: 'is required when the name has no letters or digits' }],
      });
    }
    if (findBuiltInLiquor(id) || findStoredLiquor(ctx.db, ctx.accountId, id)) {
      throw problem(
        'conflict',
        `A liquor with the id "${id}" exists already; choose another id or delete the stored one first.`,
        { errors: [{ field: 'id', message: 'is taken', value: id }] },
      );
    }
    buildCustomLiquor(input.definition, 'definition', id); // refuses a definition the engine cannot use
    const record = insertStoredLiquor(ctx.db, ctx.accountId, id, input.definition, ctx.clock());
    res
      .status(201)
      .location(pathOf(liquorGet, { liquorId: id }))
      .json(storedLiquorView(record));
  },
});

export const storedLiquorList = declareOperation({
  operation: operationCatalogue.storedLiquorList,
  method: 'get',
  path: '/v1/stored-liquors',
  openApiName: 'listStoredLiquors',
  tag: 'Liquors',
  summary: 'The liquors stored by this account, with their definitions',
  response: { description: 'Stored liquors', schema: StoredLiquorListSchema, example: listExample },
  send: 'json',
  run: (_input, ctx) => ({ liquors: listStoredLiquors(ctx.db, ctx.accountId).map(storedLiquorView) }),
});

export const storedLiquorDelete = declareOperation({
  operation: operationCatalogue.storedLiquorDelete,
  method: 'delete',
  path: '/v1/stored-liquors/{liquorId}',
  openApiName: 'deleteStoredLiquor',
  tag: 'Liquors',
  summary: 'Delete a stored liquor (built-in models cannot be deleted)',
  request: { params: StoredLiquorIdParamsSchema },
  response: { status: 204, description: 'Deleted' },
  problems: { 404: 'No stored liquor with this id' },
  run: ({ params: { liquorId } }, ctx) => {
    if (!deleteStoredLiquor(ctx.db, ctx.accountId, liquorId)) {
      throw problem(
        'not-found',
        findBuiltInLiquor(liquorId)
          ? `"${liquorId}" is a built-in liquor; it cannot be deleted.`
          : `This account has no stored liquor "${liquorId}".`,
      );
    }
  },
});
