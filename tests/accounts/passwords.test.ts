// Console password hashing: bcrypt via bcryptjs, with an SHA-256 prehash for bcrypt's 72-byte
// input limit, and verification of the earlier scrypt scheme so existing users keep signing in.
import crypto from 'node:crypto';
import bcrypt from 'bcryptjs';
import { describe, expect, it } from 'vitest';
import { hashPassword, needsRehash, verifyPassword } from '../../server/accounts/passwords.js';

describe('console password hashing', () => {
  it('stores a standard bcrypt string ($2b$, cost 11) with a fresh salt each time', () => {
    // Modular crypt format of bcrypt: $2b$<cost>$<22-char salt><31-char hash> (OpenBSD bcrypt;
    // common practice).
    const a = hashPassword('salt-pan evaporator 42');
    const b = hashPassword('salt-pan evaporator 42');
    expect(a).toMatch(/^\$2[aby]\$11\$[./A-Za-z0-9]{53}$/);
    expect(a).not.toBe(b);
    expect(bcrypt.getRounds(a)).toBe(11);
  });

  it('verifies the right password and refuses a wrong one', () => {
    const stored = hashPassword('vapour body at 18 kPa');
    expect(verifyPassword('vapour body at 18 kPa', stored)).toBe(true);
    expect(verifyPassword('vapour body at 18 kPa ', stored)).toBe(false);
  });

  it('uses every character of a passphrase longer than bcrypt’s 72-byte input', () => {
    // bcrypt ignores input past 72 bytes (Provos and Mazières 1999; common practice): two
    // passphrases that differ only after byte 72 must not both verify.
    const long = 'x'.repeat(80);
    const stored = hashPassword(`${long}A`);
    expect(verifyPassword(`${long}A`, stored)).toBe(true);
    expect(verifyPassword(`${long}B`, stored)).toBe(false);
  });

  it('still verifies a hash written by the earlier scrypt scheme and asks for a rehash', () => {
    // The earlier stored form: scrypt$N$r$p$salt$hash with node:crypto scrypt (RFC 7914).
    const salt = crypto.randomBytes(16);
    const hash = crypto.scryptSync('dairy line 2', salt, 32, {
      N: 32768,
      r: 8,
      p: 1,
      maxmem: 64 * 1024 * 1024,
    });
    const legacy = `scrypt$32768$8$1$${salt.toString('base64url')}$${hash.toString('base64url')}`;
    expect(verifyPassword('dairy line 2', legacy)).toBe(true);
    expect(verifyPassword('dairy line 3', legacy)).toBe(false);
    expect(needsRehash(legacy)).toBe(true);
    expect(needsRehash(hashPassword('dairy line 2'))).toBe(false);
  });

  it('refuses a stored value of an unknown scheme', () => {
    expect(verifyPassword('anything', 'plain-text')).toBe(false);
  });
});
