import { describe, it, expect } from 'vitest';
import { hashPassword, verifyPassword, needsRehash, ARGON2_PARAMS } from '../../src/server/auth/password';

describe('password hashing', () => {
  it('uses argon2id at or above the OWASP floor (m = 19456 KiB, t = 2, p = 1; OWASP Password Storage Cheat Sheet)', async () => {
    const stored = await hashPassword('pot still copper');
    const m = /^\$argon2id\$v=19\$m=(\d+),t=(\d+),p=(\d+)\$/.exec(stored);
    expect(m).not.toBeNull();
    expect(Number(m![1])).toBeGreaterThanOrEqual(19456);
    expect(Number(m![2])).toBeGreaterThanOrEqual(2);
    expect(Number(m![3])).toBeGreaterThanOrEqual(1);
    expect(await verifyPassword(stored, 'pot still copper')).toBe(true);
    expect(await verifyPassword(stored, 'pot still coppeR')).toBe(false);
    expect(await verifyPassword('not a hash', 'x')).toBe(false);
  });

  describe('needsRehash', () => {
    const salt = 'c2FsdHNhbHRzYWx0c2FsdA';
    const tail = `${salt}$aGFzaGhhc2hoYXNoaGFzaGhhc2hoYXNoaGFzaGhhc2g`;
    it.each([
      ["today's parameters", `$argon2id$v=19$m=${ARGON2_PARAMS.memoryCost},t=${ARGON2_PARAMS.timeCost},p=${ARGON2_PARAMS.parallelism}$${tail}`, false],
      ['stronger memory', `$argon2id$v=19$m=65536,t=2,p=1$${tail}`, false],
      ['less memory', `$argon2id$v=19$m=4096,t=2,p=1$${tail}`, true],
      ['fewer passes', `$argon2id$v=19$m=19456,t=1,p=1$${tail}`, true],
      ['argon2i, not argon2id', `$argon2i$v=19$m=19456,t=2,p=1$${tail}`, true],
      ['argon2d', `$argon2d$v=19$m=19456,t=2,p=1$${tail}`, true],
      ['a bcrypt hash', '$2b$12$abcdefghijklmnopqrstuuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ', true],
      ['garbage', 'plain-text', true],
    ])('%s', (_name, stored, expected) => {
      expect(needsRehash(stored)).toBe(expected);
    });
  });
});
