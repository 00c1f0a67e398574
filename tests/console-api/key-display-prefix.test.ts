// What the console shows of a key (prefix and public id) is never a secret character. A registered
// (bootstrap) key may be any 32–256 characters of [A-Za-z0-9_.-] (server/config.ts), so every one
// of its characters is secret; an issued key `ebk1.<publicId>.<secret>` shows only its
// format marker and public id (a key of the first format, `ebl_<kind>_…`, the start of its public id). Rows stored before this rule are fixed by migration 0005.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createAccount } from '../../server/accounts/accounts.js';
import { createKey, secretPartOf } from '../../server/accounts/keys.js';
import { bootstrap } from '../../server/seed/bootstrap.js';
import { openDatabase, runMigrations } from '../../server/db/client.js';
import { sqliteStore } from '../../server/db/store.js';
import { makeConsoleHarness, type ConsoleHarness } from './data-harness.js';

/** Invented keys of the bootstrap form (not real). */
const BOOT_KEY = 'Qz9.Local-Bootstrap_Key-7Hk2Wm4Pv8Rx1Ty5';

let h: ConsoleHarness;
beforeAll(async () => {
  h = await makeConsoleHarness();
});
afterAll(async () => {
  await h.close();
});

/** Every run of `run` characters the console shows that also occurs in the secret (should be none). */
function sharedRuns(shown: string, secret: string, run = 4): string[] {
  const out: string[] = [];
  for (let i = 0; i + run <= shown.length; i++) {
    const piece = shown.slice(i, i + run);
    if (secret.includes(piece)) out.push(piece);
  }
  return out;
}

describe('key prefix shown by the console', () => {
  it('shows a registered bootstrap key by an identifier that holds no piece of the key', async () => {
    const report = await bootstrap(
      h.deps.store,
      { ...h.deps.config, bootstrapApiKey: BOOT_KEY },
      h.clock.now,
      'test-engine',
    );
    expect(report.apiKeyRegistered).toBe(true);
    const list = await h.admin.agent.get('/console-api/keys').expect(200);
    const items = list.body.items as {
      name: string;
      prefix: string;
      publicId: string;
    }[];
    const boot = items.find((k) => k.name.startsWith('Bootstrap key'));
    expect(boot).toBeDefined();
    // Four characters in a row are far above chance for a 12-character identifier.
    expect(sharedRuns(boot!.prefix, BOOT_KEY)).toEqual([]);
    expect(sharedRuns(boot!.publicId, BOOT_KEY)).toEqual([]);
    expect(JSON.stringify(list.body)).not.toContain(BOOT_KEY.slice(0, 8));
  });

  it('shows an issued key by ebk1. and its public id, never its secret', async () => {
    const { key, token } = await createKey(h.deps.store, h.deps.config.secret, {
      accountId: h.alphaId,
      name: 'issued',
      scopes: ['steam'],
      now: h.clock.now,
    });
    expect(key.prefix).toBe(`ebk1.${key.publicId}`);
    expect(token.startsWith(`${key.prefix}.`)).toBe(true);
    expect(sharedRuns(key.prefix, secretPartOf(token)!)).toEqual([]);
  });

  it('shows a registered key of the first issued format by ebl_<kind>_ and the start of its public id', async () => {
    // Invented key of the format issued before ebk1 (not real); such keys keep working.
    const legacy = `ebl_live_LegacyPub001_${'k7'.repeat(16)}`;
    const { key } = await createKey(h.deps.store, h.deps.config.secret, {
      accountId: h.alphaId,
      name: 'first format',
      scopes: ['steam'],
      now: h.clock.now,
      token: legacy,
    });
    expect(key.publicId).toBe('LegacyPub001');
    expect(key.prefix).toBe('ebl_live_LegacyP');
    expect(secretPartOf(legacy)).toBe('k7'.repeat(16));
    expect(sharedRuns(key.prefix, 'k7'.repeat(16))).toEqual([]);
  });
});

describe('migration 0005_key_display_prefix', () => {
  it('replaces a stored prefix made of a bootstrap key’s characters by its public id, and keeps issued ones', async () => {
    const { sqlite, db } = openDatabase(':memory:');
    const store = sqliteStore(sqlite, db);
    runMigrations(db);
    const now = new Date('2031-03-14T10:00:00Z');
    const accountId = (await createAccount(store, { name: 'Invented Works', monthlyUnitQuota: 10, now })).id;
    // Keys issued when this migration landed had the first format (invented key, not real).
    const issued = await createKey(store, Buffer.from('x'.repeat(32)), {
      accountId,
      name: 'issued',
      scopes: ['steam'],
      now,
      token: `ebl_live_${'M'.repeat(12)}_${'n'.repeat(32)}`,
    });
    const boot = await createKey(store, Buffer.from('x'.repeat(32)), {
      accountId,
      name: 'boot',
      scopes: ['steam'],
      now,
      token: BOOT_KEY,
    });
    // As rows were stored before: the key's first 16 characters.
    sqlite.prepare('UPDATE api_keys SET prefix = ? WHERE id = ?').run(BOOT_KEY.slice(0, 16), boot.key.id);
    const sql = fs.readFileSync(
      path.resolve(import.meta.dirname, '../../drizzle/0005_key_display_prefix.sql'),
      'utf8',
    );
    sqlite.exec(sql);
    const prefixes = sqlite
      .prepare('SELECT id, prefix, public_id AS publicId FROM api_keys ORDER BY id')
      .all();
    expect(prefixes).toEqual([
      { id: issued.key.id, prefix: issued.key.prefix, publicId: issued.key.publicId },
      { id: boot.key.id, prefix: boot.key.publicId, publicId: boot.key.publicId },
    ]);
    sqlite.close();
  });
});
