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
import type { Db } from '../db/client.js';
import { accounts, storedLiquors } from '../db/schema.js';

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

export function findStoredLiquor(
  db: Db,
  accountId: number,
  liquorId: string,
): StoredLiquorRecord | undefined {
  const row = db
    .select()
    .from(storedLiquors)
    .where(and(eq(storedLiquors.accountId, accountId), eq(storedLiquors.liquorId, liquorId)))
    .orderBy(desc(storedLiquors.version))
    .limit(1)
    .get();
  return row ? toRecord(row) : undefined;
}

/** Only the latest version of each stored liquor. */
const isLatestVersion = sql`${storedLiquors.version} = (SELECT MAX(v.version) FROM stored_liquors v WHERE v.account_id = ${storedLiquors.accountId} AND v.liquor_id = ${storedLiquors.liquorId})`;

/** The account's stored liquors, each at its latest version. */
export function listStoredLiquors(db: Db, accountId: number): StoredLiquorRecord[] {
  return db
    .select()
    .from(storedLiquors)
    .where(and(eq(storedLiquors.accountId, accountId), isLatestVersion))
    .orderBy(asc(storedLiquors.liquorId))
    .all()
    .map(toRecord);
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
export function storedLiquorExists(db: Db, accountId: number, liquorId: string): boolean {
  return (
    db
      .select({ id: storedLiquors.id })
      .from(storedLiquors)
      .where(and(eq(storedLiquors.accountId, accountId), eq(storedLiquors.liquorId, liquorId)))
      .get() !== undefined
  );
}

/** Stores a definition (already checked by building its model) and returns the stored record. */
export function insertStoredLiquor(
  db: Db,
  accountId: number,
  liquorId: string,
  definition: CustomLiquorDefinition,
  createdAt: Date,
): StoredLiquorRecord {
  const row = db
    .insert(storedLiquors)
    .values({ accountId, liquorId, name: definition.name, definition, createdAt })
    .returning()
    .get();
  return toRecord(row);
}

/**
 * Stores a new version of an account's stored liquor (already checked by building its model);
 * undefined if the account has no liquor with this id. Earlier versions are kept.
 */
export function insertStoredLiquorVersion(
  db: Db,
  accountId: number,
  liquorId: string,
  definition: CustomLiquorDefinition,
  createdAt: Date,
): StoredLiquorRecord | undefined {
  return db.transaction((tx) => {
    const latest = tx
      .select({ version: storedLiquors.version })
      .from(storedLiquors)
      .where(and(eq(storedLiquors.accountId, accountId), eq(storedLiquors.liquorId, liquorId)))
      .orderBy(desc(storedLiquors.version))
      .limit(1)
      .get();
    if (!latest) return undefined;
    const row = tx
      .insert(storedLiquors)
      .values({
        accountId,
        liquorId,
        version: latest.version + 1,
        name: definition.name,
        definition,
        createdAt,
      })
      .returning()
      .get();
    return toRecord(row);
  });
}

/** Deletes an account's stored liquor, every version; false if it had none with this id. */
export function deleteStoredLiquor(db: Db, accountId: number, liquorId: string): boolean {
  const result = db
    .delete(storedLiquors)
    .where(and(eq(storedLiquors.accountId, accountId), eq(storedLiquors.liquorId, liquorId)))
    .run();
  return result.changes > 0;
}

/**
 * Every account's stored liquors (or one account's), each at its latest version, with the
 * account's name, for the console library.
 */
export function listStoredLiquorsWithAccounts(
  db: Db,
  accountId: number | undefined,
): { record: StoredLiquorRecord; accountId: number; accountName: string }[] {
  return db
    .select({ liquor: storedLiquors, accountName: accounts.name })
    .from(storedLiquors)
    .innerJoin(accounts, eq(accounts.id, storedLiquors.accountId))
    .where(
      accountId === undefined
        ? isLatestVersion
        : and(eq(storedLiquors.accountId, accountId), isLatestVersion),
    )
    .orderBy(storedLiquors.accountId, storedLiquors.liquorId)
    .all()
    .map(({ liquor, accountName }) => ({
      record: toRecord(liquor),
      accountId: liquor.accountId,
      accountName,
    }));
}
