/**
 * Liquors stored by an account: POST /v1/stored-liquors (a JSON definition, or a Dühring table
 * uploaded as CSV in multipart/form-data), GET /v1/stored-liquors, DELETE /v1/stored-liquors/{liquorId}.
 * A stored id can be used as `liquor` in every calculation and in /v1/liquors/{liquorId}/….
 *
 * Definitions are stored as given (display units, shape of CustomLiquorDefinitionSchema) and
 * checked by building the engine model before they are stored, so a stored liquor always builds.
 */
import type { RequestHandler } from 'express';
import {
  StoredLiquorIdParamsSchema,
  StoredLiquorCreateSchema,
  type CustomLiquorDefinition,
} from '../../../shared/contracts/index.js';
import { slugify } from '../../engine/liquors/custom.js';
import { findBuiltInLiquor } from '../../engine/liquors/registry.js';
import {
  buildCustomLiquor,
  coefficientsField,
  deleteStoredLiquor,
  duhringFromCsv,
  findStoredLiquor,
  insertStoredLiquor,
  listStoredLiquors,
  storedLiquorView,
} from '../../liquors/index.js';
import { requireOperation } from '../middleware/operation.js';
import { problem } from '../problem.js';
import { validate } from '../validation.js';
import type { V1RouteModule } from './module.js';
import { multipartOnly } from '../upload.js';

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
      body.heatCapacity === undefined ? undefined : coefficientsField(body.heatCapacity, 'heatCapacity');
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
      res.json({ liquors: listStoredLiquors(deps.db, res.locals.auth!.accountId).map(storedLiquorView) });
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
        const record = insertStoredLiquor(deps.db, accountId, id, input.definition, deps.clock());
        res.status(201).location(`/v1/liquors/${id}`).json(storedLiquorView(record));
      },
    );

    router.delete('/stored-liquors/:liquorId', requireOperation('liquors.stored.delete'), (req, res) => {
      const { liquorId } = validate(StoredLiquorIdParamsSchema, req.params);
      if (!deleteStoredLiquor(deps.db, res.locals.auth!.accountId, liquorId)) {
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
