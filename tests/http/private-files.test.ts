// The data folder, the SQLite database with its -wal/-shm files and the generated server secret
// are readable by the service's own user only. Modes: 0700 for the folder, 0600 for the files
// (common practice for secrets and databases on a multi-user host; POSIX permission bits).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { loadOrCreateSecretFile } from '../../server/config.js';
import { openDatabase, runMigrations } from '../../server/db/client.js';

const modeOf = (p: string) => fs.statSync(p).mode & 0o777;

describe('owner-only data files', () => {
  let root: string;
  let oldUmask: number;
  beforeEach(() => {
    root = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-modes-'));
    // The usual umask, which alone would leave new files world-readable (0644, folders 0755).
    oldUmask = process.umask(0o022);
  });
  afterEach(() => {
    process.umask(oldUmask);
    fs.rmSync(root, { recursive: true, force: true });
  });

  it('creates the data folder 0700 and the database, its -wal and -shm, and the secret file 0600', () => {
    const dataDir = path.join(root, 'data');
    const file = path.join(dataDir, 'ebullio.db');
    const { sqlite, db } = openDatabase(file);
    runMigrations(db); // writes, so the -wal and -shm files exist
    const secret = loadOrCreateSecretFile(dataDir);
    expect(modeOf(dataDir)).toBe(0o700);
    expect(modeOf(file)).toBe(0o600);
    expect(modeOf(`${file}-wal`)).toBe(0o600);
    expect(modeOf(`${file}-shm`)).toBe(0o600);
    expect(modeOf(secret.file)).toBe(0o600);
    sqlite.close();
  });

  it('tightens an existing world-readable folder, database, -wal, -shm and secret file at start-up', () => {
    const dataDir = path.join(root, 'data');
    const file = path.join(dataDir, 'ebullio.db');
    // A database left by an earlier version: made with the default modes.
    fs.mkdirSync(dataDir, { mode: 0o755 });
    fs.chmodSync(dataDir, 0o755);
    const first = openDatabase(file);
    runMigrations(first.db);
    const secret = loadOrCreateSecretFile(dataDir);
    first.sqlite.close();
    // A clean close removes -wal and -shm; leave world-readable ones behind as a crash would.
    for (const f of [`${file}-wal`, `${file}-shm`]) if (!fs.existsSync(f)) fs.writeFileSync(f, '');
    for (const f of [file, `${file}-wal`, `${file}-shm`, secret.file]) fs.chmodSync(f, 0o644);
    expect(modeOf(`${file}-wal`)).toBe(0o644);
    fs.chmodSync(dataDir, 0o755);

    const again = openDatabase(file);
    loadOrCreateSecretFile(dataDir);
    expect(modeOf(dataDir)).toBe(0o700);
    expect(modeOf(file)).toBe(0o600);
    expect(modeOf(`${file}-wal`)).toBe(0o600);
    expect(modeOf(`${file}-shm`)).toBe(0o600);
    expect(modeOf(secret.file)).toBe(0o600);
    // The database is the same one: its tables are still there.
    const tables = again.sqlite
      .prepare("SELECT COUNT(*) AS n FROM sqlite_master WHERE type = 'table'")
      .get() as {
      n: number;
    };
    expect(tables.n).toBeGreaterThan(0);
    again.sqlite.close();
  });

  it('leaves a shared sticky folder such as /tmp as it is', () => {
    const shared = path.join(root, 'shared');
    fs.mkdirSync(shared);
    fs.chmodSync(shared, 0o1777);
    const { sqlite } = openDatabase(path.join(shared, 'ebullio.db'));
    expect(fs.statSync(shared).mode & 0o7777).toBe(0o1777);
    expect(modeOf(path.join(shared, 'ebullio.db'))).toBe(0o600);
    sqlite.close();
  });
});
