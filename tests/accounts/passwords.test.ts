// Console password hashing: bcrypt via bcryptjs, with an SHA-256 prehash for bcrypt's 72-byte
// input limit, and verification of the earlier scrypt scheme so existing users keep signing in.
import crypto from 'node:crypto';
import bcrypt from 'bcryptjs';
import { describe, expect, it } from 'vitest';
import {
  acquireHashSlot,
  HASH_MAX_RUNNING,
  HASH_MAX_WAITING,
  HashingBusyError,
  hashPassword,
  needsRehash,
  passwordHashingStats,
  verifyPassword,
} from '../../server/accounts/passwords.js';

describe('console password hashing', async () => {
  it('stores a standard bcrypt string ($2b$, cost 11) with a fresh salt each time', async () => {
    // Modular crypt format of bcrypt: $2b$<cost>$<22-char salt><31-char hash> (OpenBSD bcrypt;
    // common practice).
    const a = await hashPassword('salt-pan evaporator 42');
    const b = await hashPassword('salt-pan evaporator 42');
    expect(a).toMatch(/^\$2[aby]\$11\$[./A-Za-z0-9]{53}$/);
    expect(a).not.toBe(b);
    expect(bcrypt.getRounds(a)).toBe(11);
  });

  it('verifies the right password and refuses a wrong one', async () => {
    const stored = await hashPassword('vapour body at 18 kPa');
    expect(await verifyPassword('vapour body at 18 kPa', stored)).toBe(true);
    expect(await verifyPassword('vapour body at 18 kPa ', stored)).toBe(false);
  });

  it('uses every character of a passphrase longer than bcrypt’s 72-byte input', async () => {
    // bcrypt ignores input past 72 bytes (Provos and Mazières 1999; common practice): two
    // passphrases that differ only after byte 72 must not both verify.
    const long = 'x'.repeat(80);
    const stored = await hashPassword(`${long}A`);
    expect(await verifyPassword(`${long}A`, stored)).toBe(true);
    expect(await verifyPassword(`${long}B`, stored)).toBe(false);
  });

  it('still verifies a hash written by the earlier scrypt scheme and asks for a rehash', async () => {
    // The earlier stored form: scrypt$N$r$p$salt$hash with node:crypto scrypt (RFC 7914).
    const salt = crypto.randomBytes(16);
    const hash = crypto.scryptSync('dairy line 2', salt, 32, {
      N: 32768,
      r: 8,
      p: 1,
      maxmem: 64 * 1024 * 1024,
    });
    const legacy = `scrypt$32768$8$1$${salt.toString('base64url')}$${hash.toString('base64url')}`;
    expect(await verifyPassword('dairy line 2', legacy)).toBe(true);
    expect(await verifyPassword('dairy line 3', legacy)).toBe(false);
    expect(needsRehash(legacy)).toBe(true);
    expect(needsRehash(await hashPassword('dairy line 2'))).toBe(false);
  });

  it('refuses a stored value of an unknown scheme', async () => {
    expect(await verifyPassword('anything', 'plain-text')).toBe(false);
  });

  it('still verifies a bcrypt hash written on the main thread by the earlier synchronous code', async () => {
    // The stored form before hashing moved to worker threads: bcryptjs.hashSync over the
    // base64 SHA-256 of the NFC password, cost 11 (this module's documented scheme).
    const prehash = crypto.createHash('sha256').update('evaporator body 3', 'utf8').digest('base64');
    const stored = bcrypt.hashSync(prehash, 11);
    expect(await verifyPassword('evaporator body 3', stored)).toBe(true);
    expect(await verifyPassword('evaporator body 4', stored)).toBe(false);
  });

  it('lets a bounded line wait while every slot is busy and refuses the next one at once', async () => {
    // Hold every computation slot so the line fills deterministically.
    const held = await Promise.all(Array.from({ length: HASH_MAX_RUNNING }, () => acquireHashSlot()));
    const queued = Array.from({ length: HASH_MAX_WAITING }, (_, i) => hashPassword(`queued ${i}`));
    expect(passwordHashingStats()).toMatchObject({ running: HASH_MAX_RUNNING, waiting: HASH_MAX_WAITING });
    await expect(verifyPassword('one too many', '$2b$11$' + 'a'.repeat(53))).rejects.toBeInstanceOf(
      HashingBusyError,
    );
    for (const release of held) release();
    const hashes = await Promise.all(queued);
    expect(hashes.every((h) => h.startsWith('$2b$11$'))).toBe(true);
    expect(passwordHashingStats()).toMatchObject({ running: 0, waiting: 0 });
  });
});
