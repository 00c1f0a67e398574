/**
 * Service configuration from environment variables (read once at start-up).
 *
 * | variable | default | meaning |
 * |---|---|---|
 * | PORT | 8080 | TCP port to listen on |
 * | DB_FILE | ./data/ebullio.db | SQLite database file (its folder is created) |
 * | EBULLIO_SECRET | generated | server secret for API-key HMACs (≥ 32 chars); if unset, 32 random bytes are generated into `<db folder>/server-secret` (mode 0600) on first start and reused |
 * | REQUEST_LOG_RETENTION_DAYS | 30 | request_log rows older than this are pruned |
 * | BODY_LIMIT | 1mb | largest accepted request body (bytes, or a size like "512kb") |
 * | BOOTSTRAP_API_KEY | — | an API key (≥ 32 chars of [A-Za-z0-9_.-]) registered with all scopes on the demo account |
 * | BOOTSTRAP_ADMIN_EMAIL / BOOTSTRAP_ADMIN_PASSWORD | — | an admin user created if absent |
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

export interface Config {
  port: number;
  dbFile: string;
  /** Folder holding the database and the generated secret file. */
  dataDir: string;
  /** Key for HMAC-SHA256 of API keys. */
  secret: Buffer;
  /** Where the secret came from: 'env', or the path of the secret file. */
  secretSource: string;
  requestLogRetentionDays: number;
  /** Largest accepted request body, bytes. */
  bodyLimitBytes: number;
  /** Request and response bodies in the request log are truncated to this many bytes. */
  logBodyLimitBytes: number;
  bootstrapApiKey: string | undefined;
  bootstrapAdminEmail: string | undefined;
  bootstrapAdminPassword: string | undefined;
}

/** A start-up configuration problem; main.ts prints the message and exits 1. */
export class ConfigError extends Error {
  override readonly name = 'ConfigError';
}

export const BOOTSTRAP_KEY_PATTERN = /^[A-Za-z0-9_.-]{32,256}$/;

function parseIntVar(
  env: NodeJS.ProcessEnv,
  name: string,
  fallback: number,
  min: number,
  max: number,
): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  if (!/^\d+$/.test(raw.trim())) throw new ConfigError(`${name} must be an integer, got "${raw}"`);
  const value = Number(raw.trim());
  if (value < min || value > max)
    throw new ConfigError(`${name} must be between ${min} and ${max}, got ${value}`);
  return value;
}

/** Parses "1048576", "512kb", "1mb" into bytes. */
export function parseSize(raw: string, name = 'BODY_LIMIT'): number {
  const m = /^\s*(\d+(?:\.\d+)?)\s*(b|kb|mb)?\s*$/i.exec(raw);
  if (!m || m[1] === undefined)
    throw new ConfigError(`${name} must be a size like 1048576, 512kb or 1mb, got "${raw}"`);
  const factor = { b: 1, kb: 1024, mb: 1024 * 1024 }[(m[2] ?? 'b').toLowerCase() as 'b' | 'kb' | 'mb'];
  const bytes = Math.floor(Number(m[1]) * factor);
  if (bytes < 1024 || bytes > 64 * 1024 * 1024) throw new ConfigError(`${name} must be between 1kb and 64mb`);
  return bytes;
}

/**
 * Reads the server secret from `<dataDir>/server-secret`, generating 32 random bytes (hex) with
 * file mode 0600 the first time. The file is created exclusively ('wx') so two processes starting
 * together cannot overwrite each other's secret.
 */
export function loadOrCreateSecretFile(dataDir: string): { secret: Buffer; file: string } {
  const file = path.join(dataDir, 'server-secret');
  fs.mkdirSync(dataDir, { recursive: true });
  try {
    fs.writeFileSync(file, crypto.randomBytes(32).toString('hex') + '\n', { mode: 0o600, flag: 'wx' });
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
  }
  const text = fs.readFileSync(file, 'utf8').trim();
  if (!/^[0-9a-f]{64}$/.test(text)) throw new ConfigError(`${file} does not hold a 64-digit hex secret`);
  return { secret: Buffer.from(text, 'hex'), file };
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const port = parseIntVar(env, 'PORT', 8080, 0, 65535);
  const dbFile = env.DB_FILE && env.DB_FILE !== '' ? env.DB_FILE : './data/ebullio.db';
  const dataDir = dbFile === ':memory:' ? path.resolve('./data') : path.dirname(path.resolve(dbFile));
  let secret: Buffer;
  let secretSource: string;
  if (env.EBULLIO_SECRET !== undefined && env.EBULLIO_SECRET !== '') {
    if (env.EBULLIO_SECRET.length < 32)
      throw new ConfigError('EBULLIO_SECRET must be at least 32 characters');
    secret = Buffer.from(env.EBULLIO_SECRET, 'utf8');
    secretSource = 'env';
  } else {
    const loaded = loadOrCreateSecretFile(dataDir);
    secret = loaded.secret;
    secretSource = loaded.file;
  }
  const bootstrapApiKey = env.BOOTSTRAP_API_KEY === '' ? undefined : env.BOOTSTRAP_API_KEY;
  if (bootstrapApiKey !== undefined && !BOOTSTRAP_KEY_PATTERN.test(bootstrapApiKey)) {
    throw new ConfigError(
      `BOOTSTRAP_API_KEY must be 32 to 256 characters of A-Z a-z 0-9 _ . - (got ${bootstrapApiKey.length} characters); ` +
        "generate one with: node -e \"console.log('ebl_live_'+require('crypto').randomBytes(24).toString('base64url'))\"",
    );
  }
  const bootstrapAdminEmail = env.BOOTSTRAP_ADMIN_EMAIL === '' ? undefined : env.BOOTSTRAP_ADMIN_EMAIL;
  const bootstrapAdminPassword =
    env.BOOTSTRAP_ADMIN_PASSWORD === '' ? undefined : env.BOOTSTRAP_ADMIN_PASSWORD;
  if ((bootstrapAdminEmail === undefined) !== (bootstrapAdminPassword === undefined)) {
    throw new ConfigError('BOOTSTRAP_ADMIN_EMAIL and BOOTSTRAP_ADMIN_PASSWORD must be set together');
  }
  if (bootstrapAdminEmail !== undefined && !/^[^@\s]+@[^@\s]+$/.test(bootstrapAdminEmail)) {
    throw new ConfigError('BOOTSTRAP_ADMIN_EMAIL is not an e-mail address');
  }
  if (bootstrapAdminPassword !== undefined && bootstrapAdminPassword.length < 12) {
    throw new ConfigError('BOOTSTRAP_ADMIN_PASSWORD must be at least 12 characters');
  }
  return {
    port,
    dbFile,
    dataDir,
    secret,
    secretSource,
    requestLogRetentionDays: parseIntVar(env, 'REQUEST_LOG_RETENTION_DAYS', 30, 1, 3650),
    bodyLimitBytes: env.BODY_LIMIT ? parseSize(env.BODY_LIMIT) : 1024 * 1024,
    logBodyLimitBytes: 8 * 1024,
    bootstrapApiKey,
    bootstrapAdminEmail,
    bootstrapAdminPassword,
  };
}
