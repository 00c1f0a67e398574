/**
 * Typing of `res.locals` across the HTTP layer (Express's `Locals` interface, augmented).
 */
import type { Scope } from '../../accounts/operations.js';

/** Who is calling: set by the API-key authentication middleware. */
export interface AuthContext {
  accountId: number;
  keyId: number;
  publicId: string;
  scopes: Scope[];
  rateLimitPerMinute: number;
  /** The account's monthly quota (units) and whether its request bodies are logged, read with the key. */
  monthlyUnitQuota: number;
  retainRequestBodies: boolean;
}

/** What the current request will be metered as; set by the metering middleware. */
export interface MeterState {
  /** OperationId once `requireOperation` ran; 'unmatched' until then. */
  operation: string;
  /** Units charged so far (billed only if the response status is < 400). */
  units: number;
  /** The account's monthly quota, units. */
  quota: number;
  /**
   * Units the rest of the account has used this calendar month (UTC), read at the moment of the
   * call: units committed to the database plus units charged by the account's other requests that
   * are still in flight. `chargeUnits` checks the quota against this, so two concurrent requests
   * cannot both spend the same remaining units.
   */
  usedByOthers(): number;
  /** What `usedByOthers()` returned at the last charge (to see whether this request crossed a quota-notice threshold). */
  usedByOthersAtCharge?: number;
  /**
   * The key was refused on the second check, after the body: the request is logged for its
   * account like a 401 at the door, with no usage event (a refused key costs and counts nothing).
   */
  keyRefused(): void;
  /** The answer is replayed from an idempotency record: logged with the mark, at 0 units. */
  idempotentReplay?: boolean;
  /**
   * Set by the idempotency middleware for a request that claimed its key: called with the final
   * status once the request's record has committed and before the bytes leave (499 when the
   * client went away), to store the answer or give the key back. Its failure is logged, never
   * the client's problem.
   */
  beforeSend?: (status: number) => Promise<void>;
  /**
   * Part of the answer was refused for want of quota (a sweep's last points): a 200 that is not
   * the answer to keep for the request's retries, since a retry after the quota is raised should
   * run those points.
   */
  cutByQuota?: boolean;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Locals {
      requestId?: string;
      /** process.hrtime.bigint() when the request arrived. */
      startedAt?: bigint;
      auth?: AuthContext;
      meter?: MeterState;
      /**
       * Checks the API key again once the request body is complete; throws the 401 problem if it
       * was revoked or expired meanwhile. Set by `reauthenticate` (middleware/auth.ts), called by
       * it after the body reader and by upload.ts after a multipart body. Synchronous on SQLite,
       * a promise on other stores.
       */
      recheckKey?: () => void | Promise<void>;
    }
  }
}

export {};
