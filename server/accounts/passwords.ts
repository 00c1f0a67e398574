/**
 * Console password hashing with bcrypt (the `bcryptjs` package: pure JavaScript, so nothing is
 * compiled or downloaded at install), cost factor 11.
 *
 * bcrypt reads at most 72 bytes of its input, so the password (NFC-normalised) is first hashed
 * with SHA-256 and base64-encoded (44 characters). That is the usual way around the limit, and
 * no part of a long passphrase is ignored. Stored form: the standard `$2b$11$<salt><hash>` string,
 * with a per-user random salt inside.
 *
 * Hashes written by an earlier version (`scrypt$N$r$p$salt$hash`, node:crypto scrypt, RFC 7914)
 * still verify, so existing users can sign in. `needsRehash` tells the caller to store a bcrypt
 * hash after such a sign-in.
 *
 * Cost factor: OWASP's Password Storage Cheat Sheet asks for a bcrypt work factor of 10 or more
 * (from memory). 11 keeps a sign-in near 100 ms on this project's 2-core machines.
 */
import crypto from 'node:crypto';
import bcrypt from 'bcryptjs';

const BCRYPT_COST = 11;

function prehash(password: string): string {
  return crypto.createHash('sha256').update(password.normalize('NFC'), 'utf8').digest('base64');
}

export function hashPassword(password: string): string {
  return bcrypt.hashSync(prehash(password), BCRYPT_COST);
}

export function verifyPassword(password: string, stored: string): boolean {
  if (stored.startsWith('$2')) return bcrypt.compareSync(prehash(password), stored);
  if (stored.startsWith('scrypt$')) return verifyLegacyScrypt(password, stored);
  return false;
}

/** True when a stored hash is not the current scheme and cost, and should be replaced after a sign-in. */
export function needsRehash(stored: string): boolean {
  return !stored.startsWith('$2') || bcrypt.getRounds(stored) !== BCRYPT_COST;
}

function verifyLegacyScrypt(password: string, stored: string): boolean {
  const parts = stored.split('$');
  if (parts.length !== 6) return false;
  const [, n, r, p, saltText, hashText] = parts as [string, string, string, string, string, string];
  const expected = Buffer.from(hashText, 'base64url');
  const actual = crypto.scryptSync(
    password.normalize('NFC'),
    Buffer.from(saltText, 'base64url'),
    expected.length,
    { N: Number(n), r: Number(r), p: Number(p), maxmem: 64 * 1024 * 1024 },
  );
  return actual.length === expected.length && crypto.timingSafeEqual(actual, expected);
}
