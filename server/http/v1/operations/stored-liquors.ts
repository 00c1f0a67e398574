/**
 * Liquors stored by an account: create and update (a JSON definition, or a Dühring table uploaded
 * as CSV in multipart/form-data), list and delete. An update stores a new version and keeps the
 * old ones; results name the version they used in `provenance`. A stored id can be used as `liquor` in every calculation
 * and in /v1/liquors/{liquorId}/…. The stored-liquor repository is in server/liquors.
 */
import type { Request } from 'express';
import type { z } from 'zod';
import {
  StoredLiquorCreateSchema,
  StoredLiquorIdParamsSchema,
  StoredLiquorUpdateSchema,
  StoredLiquorUpdateUploadSchema,
  StoredLiquorUploadFieldsSchema,
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
  inCsvTerms,
  insertStoredLiquor,
  insertStoredLiquorVersion,
  listStoredLiquors,
  storedLiquorView,
} from '../../../liquors/index.js';
import { problem } from '../../problem.js';
import { multipartOnly } from '../../upload.js';
import { validate } from '../../validate.js';
import { declareOperation, pathOf } from '../operation.js';
import { liquorGet } from './liquors.js';

/**
 * A definition uploaded as a form: the fields are checked as the OpenAPI document states them
 * (`fields`: heatCapacity is required), the CSV by the shared CSV reader, and a refusal of the
 * definition built from it names the CSV line and column rather than a JSON path.
 */
function fromUpload<T>(
  req: Request,
  fields: z.ZodType<{ id?: string; name: string; heatCapacity: string }>,
  toInput: (id: string | undefined, definition: unknown) => unknown,
  schema: z.ZodType<T>,
  check: (input: T) => void,
): T {
  const form = validate(fields, req.body ?? {});
  if (!req.file) {
    throw problem('validation-failed', 'The upload needs a CSV file in the field "file".', {
      errors: [{ field: 'file', message: 'is required' }],
    });
  }
  const heat = coefficientsField(form.heatCapacity, 'heatCapacity');
  const upload = duhringFromCsv(req.file.buffer.toString('utf8'));
  try {
    const input = validate(
      schema,
      toInput(form.id, {
        name: form.name,
        boilingPoint: upload.boilingPoint,
        heatCapacity: { polynomial: heat },
      }),
    );
    check(input);
    return input;
  } catch (err) {
    throw inCsvTerms(err, upload);
  }
}

/** Refuses a definition the engine cannot build (errors name `definition.…`). */
function buildable(id: string) {
  return (input: { definition: CustomLiquorDefinition }) => {
    buildCustomLiquor(input.definition, 'definition', id);
  };
}

/** The create request from JSON or from a multipart upload, checked to build. */
function createInput(req: Request): { id: string; definition: CustomLiquorDefinition } {
  const withId = (input: { id?: string; definition: CustomLiquorDefinition }) => {
    const id = input.id ?? slugify(input.definition.name);
    if (!/^[a-z0-9]+(?:-[a-z0-9]+)*$/.test(id)) {
      throw problem('validation-failed', 'The name gives no usable id; give an id.', {
        errors: [{ field: 'id', message: 'is required when the name has no letters or digits' }],
      });
    }
    return id;
  };
  if (req.is('multipart/form-data')) {
    let id = '';
    const input = fromUpload(
      req,
      StoredLiquorUploadFieldsSchema,
      (formId, definition) => ({ ...(formId !== undefined ? { id: formId } : {}), definition }),
      StoredLiquorCreateSchema,
      (i) => {
        id = withId(i);
        buildable(id)(i);
      },
    );
    return { id, definition: input.definition };
  }
  const input = validate(StoredLiquorCreateSchema, req.body);
  const id = withId(input);
  return { id, definition: input.definition };
}

const listExample = {
  liquors: [
    {
      id: 'north-mill-spent-wash',
      name: 'North Mill spent wash (invented)',
      kind: 'stored',
      version: 1,
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
    'A stored liquor must give its heat capacity (or an enthalpy table) besides its boiling point: evaporator calculations need it. ' +
    'CSV cells may carry units ("10 %", "40 degC"); bad cells are reported by line and column in the problem’s `errors` ' +
    '(field `line 7, column solutionBoilingPoint`; the header is line 1). ' +
    'The stored id can then be used as `liquor` in any calculation; results name its version in `provenance`.',
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
    const { id, ...input } = createInput(req);
    if (findBuiltInLiquor(id) || findStoredLiquor(ctx.store.db, ctx.accountId, id)) {
      throw problem(
        'conflict',
        `A liquor with the id "${id}" exists already; choose another id or delete the stored one first.`,
        { errors: [{ field: 'id', message: 'is taken', value: id }] },
      );
    }
    buildCustomLiquor(input.definition, 'definition', id); // refuses a definition the engine cannot use
    const record = insertStoredLiquor(ctx.store.db, ctx.accountId, id, input.definition, ctx.clock());
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
  run: (_input, ctx) => ({ liquors: listStoredLiquors(ctx.store.db, ctx.accountId).map(storedLiquorView) }),
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
    if (!deleteStoredLiquor(ctx.store.db, ctx.accountId, liquorId)) {
      throw problem(
        'not-found',
        findBuiltInLiquor(liquorId)
          ? `"${liquorId}" is a built-in liquor; it cannot be deleted.`
          : `This account has no stored liquor "${liquorId}".`,
      );
    }
  },
});

export const storedLiquorUpdate = declareOperation({
  operation: operationCatalogue.storedLiquorUpdate,
  method: 'put',
  path: '/v1/stored-liquors/{liquorId}',
  openApiName: 'updateStoredLiquor',
  tag: 'Liquors',
  summary:
    'Replace the definition of a stored liquor: it is stored as a new version (JSON, or a Dühring table uploaded as CSV)',
  description:
    'The earlier versions are kept. Calculations use the latest version from the moment this answers, and name it in ' +
    '`provenance` (the model id `custom:<liquorId>` and its `version`), so a logged result can be traced to the definition it used. ' +
    'The definition is checked as at creation: heat capacity (or an enthalpy table) is required; CSV errors name `line N, column C`.',
  request: {
    params: StoredLiquorIdParamsSchema,
    body: StoredLiquorUpdateSchema,
    upload: StoredLiquorUpdateUploadSchema,
  },
  response: { description: 'Stored as the next version', schema: StoredLiquorSchema },
  problems: {
    404: 'No stored liquor with this id (type not-found)',
    413: 'The upload is too large (type payload-too-large)',
  },
  middleware: [multipartOnly({ fieldSize: 4096 })],
  handle: (req, res, ctx) => {
    const { liquorId } = validate(StoredLiquorIdParamsSchema, req.params);
    // 404 before the definition is looked at: there is nothing to update.
    if (!findStoredLiquor(ctx.store.db, ctx.accountId, liquorId)) {
      throw problem(
        'not-found',
        findBuiltInLiquor(liquorId)
          ? `"${liquorId}" is a built-in liquor; it cannot be changed.`
          : `This account has no stored liquor "${liquorId}"; store it first with POST /v1/stored-liquors.`,
      );
    }
    const input = req.is('multipart/form-data')
      ? fromUpload(
          req,
          StoredLiquorUploadFieldsSchema.omit({ id: true }),
          (_id, definition) => ({ definition }),
          StoredLiquorUpdateSchema,
          buildable(liquorId),
        )
      : validate(StoredLiquorUpdateSchema, req.body);
    if (!req.is('multipart/form-data')) buildable(liquorId)(input);
    const record = insertStoredLiquorVersion(
      ctx.store.db,
      ctx.accountId,
      liquorId,
      input.definition,
      ctx.clock(),
    );
    if (!record) throw problem('not-found', `This account has no stored liquor "${liquorId}".`);
    res.location(pathOf(liquorGet, { liquorId })).json(storedLiquorView(record));
  },
});
