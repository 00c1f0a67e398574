/**
 * Owner-only modes for the files that hold accounts, key hashes and the server secret: the data
 * folder 0700, the SQLite database (and its -wal / -shm) and the secret file 0600. New ones are
 * created so; existing ones are tightened at start-up when this process's user owns them.
 *
 * A folder is tightened only when it is plainly ours to tighten: owned by us, not sticky (a
 * shared folder such as /tmp) and not the file-system root or the home directory (a DB_FILE placed
 * directly in $HOME must not lock the home folder).
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

export const PRIVATE_DIR_MODE = 0o700;
export const PRIVATE_FILE_MODE = 0o600;

function ownedByUs(stat: fs.Stats): boolean {
  return typeof process.getuid !== 'function' || stat.uid === process.getuid();
}

/** Creates the folder (and missing parents) with mode 0700, or tightens an existing one. */
export function ensurePrivateDir(dir: string): void {
  const abs = path.resolve(dir);
  fs.mkdirSync(abs, { recursive: true, mode: PRIVATE_DIR_MODE });
  const stat = fs.statSync(abs);
  const shared =
    (stat.mode & 0o1000) !== 0 || abs === path.parse(abs).root || abs === path.resolve(os.homedir());
  if (!shared && ownedByUs(stat) && (stat.mode & 0o777) !== PRIVATE_DIR_MODE) {
    fs.chmodSync(abs, PRIVATE_DIR_MODE);
  }
}

/** Sets an existing file we own to mode 0600 (a missing file is left alone). */
export function restrictFile(file: string): void {
  let stat: fs.Stats;
  try {
    stat = fs.statSync(file);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return;
    throw err;
  }
  if (stat.isFile() && ownedByUs(stat) && (stat.mode & 0o777) !== PRIVATE_FILE_MODE) {
    fs.chmodSync(file, PRIVATE_FILE_MODE);
  }
}

/**
 * Creates the database file empty with mode 0600 if it does not exist yet (SQLite gives its -wal
 * and -shm files the mode of the database file), and tightens it and its companions if it does.
 */
export function preparePrivateDatabaseFile(file: string): void {
  ensurePrivateDir(path.dirname(path.resolve(file)));
  fs.closeSync(fs.openSync(file, fs.constants.O_CREAT | fs.constants.O_RDWR, PRIVATE_FILE_MODE));
  for (const f of [file, `${file}-wal`, `${file}-shm`, `${file}-journal`]) restrictFile(f);
}
