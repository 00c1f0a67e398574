/**
 * Multipart uploads of one CSV file in the field "file" (multer, memory storage), shared by
 * /v1/batch, /v1/stored-liquors and the console's liquor library, so the three answer alike:
 *
 * - the file over MAX_UPLOAD_BYTES → 413 'payload-too-large';
 * - any other limit multer enforces (a file in another field, a second file, too many or too long
 *   text fields) → 422 'validation-failed' naming the field;
 * - a body that is not readable multipart → 400 'bad-request'.
 */
import type { Request, RequestHandler, Response } from 'express';
import multer from 'multer';
import { MAX_UPLOAD_BYTES } from '../../shared/contracts/liquors.js';
import { checkJsonBody } from './middleware/body.js';
import { problem, type ProblemError } from './problem.js';

/** multer's limits below: at most this many text fields, each at most this large by default. */
const MAX_FIELDS = 10;
const DEFAULT_FIELD_SIZE = 1024 * 1024;
/**
 * The largest multipart body any upload route can accept: the file, every text field at its
 * largest, and 64 KiB for the part headers and boundaries. server.ts refuses a larger declared
 * Content-Length under Expect: 100-continue before the body is sent.
 */
export const MULTIPART_BODY_CEILING = MAX_UPLOAD_BYTES + MAX_FIELDS * DEFAULT_FIELD_SIZE + 64 * 1024;

export interface UploadOptions {
  /** Largest text field, bytes (multer's default is 1 MB). */
  fieldSize?: number;
}

function uploadProblem(err: unknown): ProblemError {
  if (err instanceof multer.MulterError) {
    if (err.code === 'LIMIT_FILE_SIZE') {
      return problem('payload-too-large', `The uploaded file exceeds ${MAX_UPLOAD_BYTES} bytes.`);
    }
    return problem('validation-failed', err.message, {
      errors: [{ field: err.field ?? 'file', message: err.message }],
    });
  }
  return problem('bad-request', `The multipart body could not be read: ${(err as Error).message}`);
}

/** Reads the multipart body into req.file and req.body; rejects with a problem. */
export function singleCsvUpload(options: UploadOptions = {}): (req: Request, res: Response) => Promise<void> {
  const single = multer({
    storage: multer.memoryStorage(),
    limits: {
      fileSize: MAX_UPLOAD_BYTES,
      files: 1,
      fields: MAX_FIELDS,
      // Bracketed field names build nested objects: bound their nesting and array indices so a
      // field name cannot make a huge sparse array or a deep tree for later code to walk.
      fieldNestingDepth: 8,
      fieldArrayIndexLimit: 999,
      ...(options.fieldSize !== undefined ? { fieldSize: options.fieldSize } : {}),
    },
  }).single('file');
  return (req, res) =>
    new Promise((resolve, reject) => {
      single(req, res, (err: unknown) => {
        if (err) return reject(uploadProblem(err));
        const afterRecheck = () => {
          // Field names are as hostile as JSON property names: the same refusals.
          const refused = checkJsonBody(req.body);
          if (refused) {
            req.body = undefined;
            return reject(refused);
          }
          resolve();
        };
        // The body is complete: an API key revoked while it arrived refuses the request here.
        let rechecked: void | Promise<void>;
        try {
          rechecked = res.locals.recheckKey?.();
        } catch (e) {
          return reject(e as Error);
        }
        if (rechecked instanceof Promise) rechecked.then(afterRecheck, reject);
        else afterRecheck();
      });
    });
}

/** Middleware form: reads multipart requests, passes the others on untouched. */
export function multipartOnly(options: UploadOptions = {}): RequestHandler {
  const read = singleCsvUpload(options);
  return (req, res, next) => {
    if (!req.is('multipart/form-data')) return next();
    read(req, res).then(() => next(), next);
  };
}
