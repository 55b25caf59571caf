import { describe, expect, it } from 'vitest';
import { DEFAULT_SCRYPT_COST, hashPassword, unmatchableHash, verifyPassword } from './passwords.js';

describe('passwords', () => {
  it('verifies the right password and refuses a wrong one', async () => {
    const stored = await hashPassword('correct horse battery');
    expect(stored.startsWith(`scrypt$${DEFAULT_SCRYPT_COST.N}$8$1$`)).toBe(true);
    expect(await verifyPassword('correct horse battery', stored)).toBe(true);
    expect(await verifyPassword('correct horse batterY', stored)).toBe(false);
  });

  it('salts every hash', async () => {
    const cheap = { N: 1024, r: 8, p: 1 };
    expect(await hashPassword('same password', cheap)).not.toBe(await hashPassword('same password', cheap));
  });

  it('reads the cost from the stored hash', async () => {
    const stored = await hashPassword('low cost fixture', { N: 1024, r: 8, p: 1 });
    expect(stored.split('$').slice(1, 4)).toEqual(['1024', '8', '1']);
    expect(await verifyPassword('low cost fixture', stored)).toBe(true);
  });

  it('never matches a malformed hash or the unmatchable one', async () => {
    for (const stored of ['', 'plain', 'scrypt$x$8$1$c2FsdA==$aGFzaA==', 'bcrypt$1$2$3$4$5']) {
      expect(await verifyPassword('anything', stored)).toBe(false);
    }
    expect(await verifyPassword('', await unmatchableHash())).toBe(false);
  });

  it('treats composed and decomposed Unicode the same (NFKC)', async () => {
    const stored = await hashPassword('caf\u00e9-password', { N: 1024, r: 8, p: 1 });
    expect(await verifyPassword('cafe\u0301-password', stored)).toBe(true);
  });
});
