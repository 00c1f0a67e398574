/**
 * Demo data for a fresh database (all names invented): an operator (admin) user, two client
 * accounts with one key each, and a week of plausible usage so a console has something to show.
 *
 * The demo keys' secrets are never printed or stored: the documented way in is BOOTSTRAP_API_KEY,
 * which main.ts registers on the demo account (see bootstrap.ts).
 */
import crypto from 'node:crypto';
import { sql } from 'drizzle-orm';
import type { Store } from '../db/store.js';
import { addMember, createAccount, insertUser } from '../accounts/accounts.js';
import { hashPassword } from '../accounts/passwords.js';
import { createKey } from '../accounts/keys.js';
import { recordRequests, type RequestRecord } from '../accounts/metering.js';
import { operationCatalogue, scopes, type OperationId } from '../accounts/operations.js';
import { pathOf } from '../http/v1/operation.js';
import { operationDeclaration } from '../http/v1/operations/index.js';

/** The account BOOTSTRAP_API_KEY is registered on. */
export const DEMO_ACCOUNT_NAME = 'Saltmarsh Chlor-Alkali Works, Process Engineering';
export const SECOND_DEMO_ACCOUNT_NAME = 'Heatherfold Dairy Concentrates';
export const DEMO_OPERATOR_EMAIL = 'operator@ebullio.invalid';

export async function isDatabaseEmpty(store: Store): Promise<boolean> {
  const [row] = await store.rows<{ n: number | string }>(
    sql`SELECT (SELECT COUNT(*) FROM accounts) + (SELECT COUNT(*) FROM users) AS n`,
  );
  return Number(row?.n) === 0;
}

/** Small deterministic generator so the demo looks the same on every fresh start. */
function mulberry32(seed: number): () => number {
  let a = seed;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

interface DemoMix {
  operation: OperationId;
  perDay: number;
  units: number;
}

/** The demo account's requests of the past `days` days, as metering would have recorded them. */
function demoUsage(
  accountId: number,
  keyId: number,
  mix: DemoMix[],
  now: Date,
  days: number,
  engineVersion: string,
): RequestRecord[] {
  const records: RequestRecord[] = [];
  const random = mulberry32(accountId * 7919);
  for (let d = days; d >= 1; d--) {
    const dayStart = Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate() - d);
    for (const m of mix) {
      const n = Math.round(m.perDay * (0.6 + 0.8 * random()));
      for (let i = 0; i < n; i++) {
        const at = new Date(dayStart + Math.floor((7 + 11 * random()) * 3_600_000));
        const failed = random() < 0.04;
        records.push({
          at,
          accountId,
          keyId,
          operation: m.operation,
          status: failed ? 422 : 200,
          units: failed ? 0 : m.units,
          latencyMs: Math.round(2 + 20 * random()),
          requestId: crypto.randomUUID(),
          engineVersion,
          method: operationDeclaration(m.operation)!.method.toUpperCase(),
          path: pathOf(operationDeclaration(m.operation)!, { liquorId: 'naoh-olsson-1997' }),
          requestBody: null,
          responseBody: null,
        });
      }
    }
  }
  return records;
}

/** What a first start may show once: the demo operator's sign-in and the demo account's key. */
export interface DemoCredentials {
  accountId: number;
  operatorEmail: string;
  /** Random, generated at seeding; stored only as a hash. */
  operatorPassword: string;
  /** The secret of the caustic account's demo key; stored only as a keyed hash. */
  apiKey: string;
}

/**
 * Fills an empty database with the demo scenario. The operator's password and the demo key are
 * random; they are returned (committed first, stored only as hashes) so start-up can show them
 * once, and are never shown again.
 */
export async function seedDemo(
  store: Store,
  serverSecret: Buffer,
  now: Date,
  engineVersion: string,
): Promise<DemoCredentials> {
  const operatorPassword = crypto.randomBytes(12).toString('base64url');
  // Hashed before the transaction: hashing runs in a worker thread, and a transaction awaits
  // nothing but the store (server/db/store.ts).
  const operatorHash = await hashPassword(operatorPassword);
  // The demo accounts and keys date from the start of last month (UTC): before their first metered
  // day (the usage below goes back six days), and early enough that last month can be billed.
  const since = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth() - 1, 1));
  return store.transaction(async (tx) => {
    const operator = await insertUser(tx, {
      email: DEMO_OPERATOR_EMAIL,
      passwordHash: operatorHash,
      role: 'admin',
      now,
    });
    const caustic = await createAccount(tx, {
      name: DEMO_ACCOUNT_NAME,
      plan: 'professional',
      monthlyUnitQuota: 50_000,
      billingEmail: 'accounts@saltmarsh-alkali.invalid',
      now: since,
    });
    const dairy = await createAccount(tx, {
      name: SECOND_DEMO_ACCOUNT_NAME,
      plan: 'starter',
      monthlyUnitQuota: 5_000,
      billingEmail: 'finance@heatherfold-dairy.invalid',
      retainRequestBodies: true,
      now: since,
    });
    await addMember(tx, operator.id, caustic.id);
    await addMember(tx, operator.id, dairy.id);
    const causticCreated = await createKey(tx, serverSecret, {
      accountId: caustic.id,
      name: 'Caustic evaporator studies',
      scopes: [...scopes],
      rateLimitPerMinute: 120,
      now: since,
    });
    const causticKey = causticCreated.key;
    const { key: dairyKey } = await createKey(tx, serverSecret, {
      accountId: dairy.id,
      name: 'Falling-film line 2',
      scopes: ['steam', 'liquors', 'evaporators', 'usage'],
      rateLimitPerMinute: 60,
      now: since,
    });
    const usage = demoUsage(
      caustic.id,
      causticKey.id,
      [
        { operation: operationCatalogue.liquorBoilingPoint.id, perDay: 40, units: 1 },
        { operation: operationCatalogue.steamSaturation.id, perDay: 25, units: 1 },
        { operation: operationCatalogue.multipleEffect.id, perDay: 8, units: 20 },
        { operation: operationCatalogue.liquorList.id, perDay: 3, units: 0 },
      ],
      now,
      6,
      engineVersion,
    );
    usage.push(
      ...demoUsage(
        dairy.id,
        dairyKey.id,
        [
          { operation: operationCatalogue.singleEffect.id, perDay: 12, units: 5 },
          { operation: operationCatalogue.steamState.id, perDay: 15, units: 1 },
        ],
        now,
        4,
        engineVersion,
      ),
    );
    // One group, as the metering group commit writes a busy moment's requests.
    await recordRequests(tx, usage);
    return {
      accountId: caustic.id,
      operatorEmail: DEMO_OPERATOR_EMAIL,
      operatorPassword,
      apiKey: causticCreated.token,
    };
  });
}
