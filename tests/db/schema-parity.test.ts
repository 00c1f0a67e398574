// The SQLite schema (server/db/schema.ts) and the PostgreSQL one (server/db/schema-pg.ts) must
// declare the same tables, columns, keys, indexes and foreign keys: the app reads both through the
// same code, and a column added to one file only would fail at run time on the other database.
import { getTableName, is, Table } from 'drizzle-orm';
import { getTableConfig as pgTableConfig, PgTable } from 'drizzle-orm/pg-core';
import { getTableConfig as sqliteTableConfig, SQLiteTable } from 'drizzle-orm/sqlite-core';
import { describe, expect, it } from 'vitest';
import * as pgSchema from '../../server/db/schema-pg.js';
import * as sqliteSchema from '../../server/db/schema.js';

/** What both dialects must agree on, in names only (types differ on purpose; see schema-pg.ts). */
interface Shape {
  columns: Record<string, { notNull: boolean; unique: boolean; hasDefault: boolean }>;
  primaryKey: string[];
  indexes: Record<string, { unique: boolean; columns: string[] }>;
  foreignKeys: string[];
}

type Config = ReturnType<typeof pgTableConfig> | ReturnType<typeof sqliteTableConfig>;

function shapeOf(config: Config): Shape {
  const columns: Shape['columns'] = {};
  for (const c of config.columns) {
    columns[c.name] = { notNull: c.notNull, unique: c.isUnique, hasDefault: c.hasDefault || c.primary };
  }
  const primaryKey = [
    ...config.columns.filter((c) => c.primary).map((c) => c.name),
    ...config.primaryKeys.flatMap((pk) => pk.columns.map((c) => c.name)),
  ];
  const indexes: Shape['indexes'] = {};
  for (const index of config.indexes) {
    indexes[index.config.name ?? '?'] = {
      unique: Boolean(index.config.unique),
      columns: index.config.columns.map((c) => (c as { name: string }).name),
    };
  }
  const foreignKeys = config.foreignKeys
    .map((fk) => {
      const ref = fk.reference();
      const from = ref.columns.map((c) => c.name).join(',');
      const to = ref.foreignColumns.map((c) => c.name).join(',');
      return `${from} -> ${getTableName(ref.foreignTable)}(${to}) on delete ${fk.onDelete ?? 'no action'}`;
    })
    .sort();
  return { columns, primaryKey, indexes, foreignKeys };
}

function tablesOf(schema: Record<string, unknown>, kind: typeof PgTable | typeof SQLiteTable) {
  const tables = new Map<string, Shape>();
  for (const value of Object.values(schema)) {
    if (!is(value, Table)) continue;
    if (kind === PgTable && is(value, PgTable))
      tables.set(getTableName(value), shapeOf(pgTableConfig(value)));
    if (kind === SQLiteTable && is(value, SQLiteTable)) {
      tables.set(getTableName(value), shapeOf(sqliteTableConfig(value)));
    }
  }
  return tables;
}

const sqliteTables = tablesOf(sqliteSchema, SQLiteTable);
const pgTables = tablesOf(pgSchema, PgTable);

describe('the PostgreSQL schema mirrors the SQLite schema', () => {
  it('declares the same tables', () => {
    expect(sqliteTables.size).toBeGreaterThanOrEqual(17);
    expect([...pgTables.keys()].sort()).toEqual([...sqliteTables.keys()].sort());
  });

  it.each([...sqliteTables.keys()])('%s has the same columns with the same nullability', (table) => {
    const sqlite = sqliteTables.get(table)!;
    const pg = pgTables.get(table);
    expect(pg, `${table} is missing from schema-pg.ts`).toBeDefined();
    expect(pg!.columns).toEqual(sqlite.columns);
  });

  it.each([...sqliteTables.keys()])('%s has the same primary key, indexes and foreign keys', (table) => {
    const sqlite = sqliteTables.get(table)!;
    const pg = pgTables.get(table)!;
    expect(pg.primaryKey).toEqual(sqlite.primaryKey);
    expect(pg.indexes).toEqual(sqlite.indexes);
    expect(pg.foreignKeys).toEqual(sqlite.foreignKeys);
  });

  it('notices a column that one schema lacks', () => {
    // The comparison itself must be able to fail: drop a column from a copy and expect a difference.
    const accounts = structuredClone(sqliteTables.get('accounts')!);
    delete accounts.columns.plan;
    expect(accounts.columns).not.toEqual(pgTables.get('accounts')!.columns);
  });
});
