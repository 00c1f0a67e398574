/**
 * The stored-liquor repository: an account's own liquor definitions in the `stored_liquors`
 * table. Definitions are stored as given (display units, the shape of
 * CustomLiquorDefinitionSchema) and only after their model builds, so a stored liquor always builds.
 * An update stores a new version (a new row) and keeps the old ones; calculations use the latest,
 * and name its version in their provenance. Deleting a liquor deletes all its versions.
 */
import { and, asc, desc, eq, sql } from 'drizzle-orm';
import {
  CustomLiquorDefinitionSchema,
  type CustomLiquorDefinition,
  type StoredLiquor,
} from '../../shared/contracts/index.js';
import type { storedLiquors } from '../db/schema.js';
import type { Store, Tables } from '../db/store.js';

export interface StoredLiquorRecord {
  /** Database row id: never reused, so it identifies this exact definition (internal only). */
  rowId: number;
  id: string;
  /** 1 when stored, +1 with each update. */
  version: number;
  name: string;
  definition: CustomLiquorDefinition;
  /** When this version was stored. */
  createdAt: Date;
}

function toRecord(row: typeof storedLiquors.$inferSelect): StoredLiquorRecord {
  return {
    rowId: row.id,
    id: row.liquorId,
    version: row.version,
    name: row.name,
    definition: CustomLiquorDefinitionSchema.parse(row.definition),
    createdAt: row.createdAt,
  };
}

export async function findStoredLiquor(
  store: Store,
  accountId: number,
  liquorId: string,
): Promise<StoredLiquorRecord | undefined> {
  const { storedLiquors } = store.t;
  const [row] = await store.db
    .select()
    .from(storedLiquors)
    .where(and(eq(storedLiquors.accountId, accountId), eq(storedLiquors.liquorId, liquorId)))
    .orderBy(desc(storedLiquors.version))
    .limit(1);
  return row ? toRecord(row) : undefined;
}

/** Only the latest version of each stored liquor (the columns of this store's table). */
function isLatestVersion({ storedLiquors }: Tables) {
  return sql`${storedLiquors.version} = (SELECT MAX(v.version) FROM stored_liquors v WHERE v.account_id = ${storedLiquors.accountId} AND v.liquor_id = ${storedLiquors.liquorId})`;
}

/** The account's stored liquors, each at its latest version. */
export async function listStoredLiquors(store: Store, accountId: number): Promise<StoredLiquorRecord[]> {
  const { storedLiquors } = store.t;
  const rows = await store.db
    .select()
    .from(storedLiquors)
    .where(and(eq(storedLiquors.accountId, accountId), isLatestVersion(store.t)))
    .orderBy(asc(storedLiquors.liquorId));
  return rows.map(toRecord);
}

/** The API's view of a stored liquor. */
export function storedLiquorView(r: StoredLiquorRecord): StoredLiquor {
  return {
    id: r.id,
    name: r.name,
    kind: 'stored',
    version: r.version,
    definition: r.definition,
    createdAt: r.createdAt.toISOString(),
  };
}

/** True if the account stores a liquor with this id (a cheap existence check, no definition parsed). */
export async function storedLiquorExists(
  store: Store,
  accountId: number,
  liquorId: string,
): Promise<boolean> {
  const { storedLiquors } = store.t;
  const rows = await store.db
    .select({ id: storedLiquors.id })
    .from(storedLiquors)
    .where(and(eq(storedLiquors.accountId, accountId), eq(storedLiquors.liquorId, liquorId)))
    .limit(1);
  return rows.length > 0;
}

/** Stores a definition (already checked by building its model) and returns the stored record. */
export async function insertStoredLiquor(
  store: Store,
  accountId: number,
  liquorId: string,
  definition: CustomLiquorDefinition,
  createdAt: Date,
): Promise<StoredLiquorRecord> {
  const { storedLiquors } = store.t;
  const [row] = await store.db
    .insert(storedLiquors)
    .values({ accountId, liquorId, name: definition.name, definition, createdAt })
    .returning();
  return toRecord(row!);
}

/**
 * Stores a new version of an account's stored liquor (already checked by building its model);
 * undefined if the account has no liquor with this id. Earlier versions are kept.
 */
export async function insertStoredLiquorVersion(
  store: Store,
  accountId: number,
  liquorId: string,
  definition: CustomLiquorDefinition,
  createdAt: Date,
): Promise<StoredLiquorRecord | undefined> {
  return store.transaction(async (tx) => {
    const { storedLiquors } = tx.t;
    const [latest] = await tx.db
      .select({ version: storedLiquors.version })
      .from(storedLiquors)
      .where(and(eq(storedLiquors.accountId, accountId), eq(storedLiquors.liquorId, liquorId)))
      .orderBy(desc(storedLiquors.version))
      .limit(1);
    if (!latest) return undefined;
    const [row] = await tx.db
      .insert(storedLiquors)
      .values({
        accountId,
        liquorId,
        version: latest.version + 1,
        name: definition.name,
        definition,
        createdAt,
      })
      .returning();
    return toRecord(row!);
  });
}

/** Deletes an account's stored liquor, every version; false if it had none with this id. */
export async function deleteStoredLiquor(
  store: Store,
  accountId: number,
  liquorId: string,
): Promise<boolean> {
  const { storedLiquors } = store.t;
  const deleted = await store.db
    .delete(storedLiquors)
    .where(and(eq(storedLiquors.accountId, accountId), eq(storedLiquors.liquorId, liquorId)))
    .returning({ id: storedLiquors.id });
  return deleted.length > 0;
}

/**
 * Every account's stored liquors (or one account's), each at its latest version, with the
 * account's name, for the console library.
 */
export async function listStoredLiquorsWithAccounts(
  store: Store,
  accountId: number | undefined,
): Promise<{ record: StoredLiquorRecord; accountId: number; accountName: string }[]> {
  const { accounts, storedLiquors } = store.t;
  const latest = isLatestVersion(store.t);
  const rows = await store.db
    .select({ liquor: storedLiquors, accountName: accounts.name })
    .from(storedLiquors)
    .innerJoin(accounts, eq(accounts.id, storedLiquors.accountId))
    .where(accountId === undefined ? latest : and(eq(storedLiquors.accountId, accountId), latest))
    .orderBy(storedLiquors.accountId, storedLiquors.liquorId);
  return rows.map(({ liquor, accountName }) => ({
    record: toRecord(liquor),
    accountId: liquor.accountId,
    accountName,
  }));
}
