/**
 * The secret an account's job callbacks are signed with (HMAC-SHA256, server/http/jobs/callback.ts).
 * Created or rotated through the console and shown once; it must be read back to sign, so it is
 * stored encrypted rather than hashed: AES-256-GCM under a key derived from the server secret
 * with HKDF-SHA256 (RFC 5869), a fresh 96-bit nonce per secret, stored as
 * `v1.<nonce>.<tag>.<ciphertext>` (base64url). A server secret that changes makes the stored
 * secrets unreadable: a job with a callback is then refused until the secret is rotated.
 */
import crypto from 'node:crypto';
import { eq } from 'drizzle-orm';
import type { Store } from '../db/store.js';

/** `ebs1_` and 43 base64url characters (256 random bits). */
const PREFIX = 'ebs1_';

const keys = new WeakMap<Buffer, Buffer>();
function encryptionKey(serverSecret: Buffer): Buffer {
  let key = keys.get(serverSecret);
  if (!key) {
    key = Buffer.from(
      crypto.hkdfSync('sha256', serverSecret, 'ebullio-signing', 'callback-signing-secret-v1', 32),
    );
    keys.set(serverSecret, key);
  }
  return key;
}

function seal(serverSecret: Buffer, plain: string): string {
  const nonce = crypto.randomBytes(12);
  const cipher = crypto.createCipheriv('aes-256-gcm', encryptionKey(serverSecret), nonce);
  const body = Buffer.concat([cipher.update(plain, 'utf8'), cipher.final()]);
  const parts = [nonce, cipher.getAuthTag(), body].map((b) => b.toString('base64url'));
  return `v1.${parts.join('.')}`;
}

function open(serverSecret: Buffer, sealed: string): string | undefined {
  const [version, nonce, tag, body] = sealed.split('.');
  if (version !== 'v1' || nonce === undefined || tag === undefined || body === undefined) return undefined;
  try {
    const decipher = crypto.createDecipheriv(
      'aes-256-gcm',
      encryptionKey(serverSecret),
      Buffer.from(nonce, 'base64url'),
    );
    decipher.setAuthTag(Buffer.from(tag, 'base64url'));
    return Buffer.concat([decipher.update(Buffer.from(body, 'base64url')), decipher.final()]).toString(
      'utf8',
    );
  } catch {
    return undefined;
  }
}

/** Creates (or replaces) the account's signing secret; returns it, the only time it is shown. */
export async function rotateSigningSecret(
  store: Store,
  serverSecret: Buffer,
  accountId: number,
  now: Date,
): Promise<{ secret: string; createdAt: Date }> {
  const secret = `${PREFIX}${crypto.randomBytes(32).toString('base64url')}`;
  const { accountSigningSecrets } = store.t;
  const sealed = seal(serverSecret, secret);
  await store.db
    .insert(accountSigningSecrets)
    .values({ accountId, secret: sealed, createdAt: now })
    .onConflictDoUpdate({
      target: accountSigningSecrets.accountId,
      set: { secret: sealed, createdAt: now },
    });
  return { secret, createdAt: now };
}

/** The account's signing secret in clear (to sign with), or undefined when it has none (or it cannot be read). */
export async function signingSecretOf(
  store: Store,
  serverSecret: Buffer,
  accountId: number,
): Promise<string | undefined> {
  const { accountSigningSecrets } = store.t;
  const [row] = await store.db
    .select({ secret: accountSigningSecrets.secret })
    .from(accountSigningSecrets)
    .where(eq(accountSigningSecrets.accountId, accountId))
    .limit(1);
  return row ? open(serverSecret, row.secret) : undefined;
}

/** When the account's signing secret was made (undefined: it has none). */
export async function signingSecretCreatedAt(store: Store, accountId: number): Promise<Date | undefined> {
  const { accountSigningSecrets } = store.t;
  const [row] = await store.db
    .select({ createdAt: accountSigningSecrets.createdAt })
    .from(accountSigningSecrets)
    .where(eq(accountSigningSecrets.accountId, accountId))
    .limit(1);
  return row?.createdAt;
}
