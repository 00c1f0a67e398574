/**
 * Password hashing with node:crypto scrypt (RFC 7914) and a per-user random salt.
 * Stored form: `scrypt$<N>$<r>$<p>$<salt base64url>$<hash base64url>`, so parameters can be raised
 * later without invalidating old hashes. N = 2^15, r = 8, p = 1 (the RFC 7914 §2 interactive-login
 * example uses N = 2^14; 2^15 is the OWASP password-storage cheat sheet's minimum, from memory).
 */
import crypto from 'node:crypto';

const N = 32768;
const R = 8;
const P = 1;
const KEY_LENGTH = 32;
const MAXMEM = 64 * 1024 * 1024;

export function hashPassword(password: string): string {
  const salt = crypto.randomBytes(16);
  const hash = crypto.scryptSync(password.normalize('NFC'), salt, KEY_LENGTH, {
    N,
    r: R,
    p: P,
    maxmem: MAXMEM,
  });
  return `scrypt$${N}$${R}$${P}$${salt.toString('base64url')}$${hash.toString('base64url')}`;
}

export function verifyPassword(password: string, stored: string): boolean {
  const parts = stored.split('$');
  if (parts.length !== 6 || parts[0] !== 'scrypt') return false;
  const [, n, r, p, saltText, hashText] = parts as [string, string, string, string, string, string];
  const expected = Buffer.from(hashText, 'base64url');
  const actual = crypto.scryptSync(
    password.normalize('NFC'),
    Buffer.from(saltText, 'base64url'),
    expected.length,
    {
      N: Number(n),
      r: Number(r),
      p: Number(p),
      maxmem: MAXMEM,
    },
  );
  return actual.length === expected.length && crypto.timingSafeEqual(actual, expected);
}
