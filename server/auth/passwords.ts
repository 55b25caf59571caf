import { randomBytes, scrypt, timingSafeEqual, type ScryptOptions } from 'node:crypto';

/**
 * Password hashes with Node's scrypt. Stored as "scrypt$N$r$p$salt$hash" (base64): a check reads the cost
 * from the stored hash, so the cost can rise later without breaking stored hashes. N = 2^15, r = 8, p = 1
 * (32 MiB, about 0.2 s per check on the 2-core machine this runs on) is twice Node's default N; the OWASP
 * Password Storage Cheat Sheet suggests 2^17 (from memory), which costs about 0.8 s per sign-in here.
 * 64-byte key, 16-byte salt.
 */
export interface ScryptCost {
  readonly N: number;
  readonly r: number;
  readonly p: number;
}

export const DEFAULT_SCRYPT_COST: ScryptCost = { N: 2 ** 15, r: 8, p: 1 };
const KEY_LENGTH = 64;
const SALT_LENGTH = 16;

function derive(password: string, salt: Buffer, options: ScryptOptions, keyLength: number): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    scrypt(password.normalize('NFKC'), salt, keyLength, { ...options, maxmem: 256 * 1024 * 1024 }, (error, key) =>
      error ? reject(error) : resolve(key),
    );
  });
}

/** Hashes a password; `cost` other than the default is for test fixtures that sign in often. */
export async function hashPassword(password: string, cost: ScryptCost = DEFAULT_SCRYPT_COST): Promise<string> {
  const salt = randomBytes(SALT_LENGTH);
  const key = await derive(password, salt, cost, KEY_LENGTH);
  return ['scrypt', cost.N, cost.r, cost.p, salt.toString('base64'), key.toString('base64')].join('$');
}

/** Checks a password against a stored hash in constant time; a malformed hash never matches. */
export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const parts = stored.split('$');
  if (parts.length !== 6 || parts[0] !== 'scrypt') return false;
  const [N, r, p] = parts.slice(1, 4).map(Number);
  const salt = Buffer.from(parts[4], 'base64');
  const expected = Buffer.from(parts[5], 'base64');
  if (![N, r, p].every(Number.isSafeInteger) || expected.length === 0) return false;
  const actual = await derive(password, salt, { N, r, p }, expected.length);
  return timingSafeEqual(actual, expected);
}

let cachedUnmatchableHash: Promise<string> | undefined;

/** A hash no password matches, checked when the username is unknown so the timing does not tell. */
export function unmatchableHash(): Promise<string> {
  cachedUnmatchableHash ??= hashPassword(randomBytes(32).toString('base64'));
  return cachedUnmatchableHash;
}
