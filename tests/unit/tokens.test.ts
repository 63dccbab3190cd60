import { describe, it, expect } from 'vitest';
import { newToken, hashToken } from '../../src/server/auth/tokens';

describe('newToken and hashToken', () => {
  it('makes 256-bit URL-safe tokens (OWASP ASVS: at least 128 bits from a CSPRNG)', () => {
    const tok = newToken();
    expect(tok).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(Buffer.from(tok, 'base64url').length * 8).toBeGreaterThanOrEqual(128);
    const many = new Set(Array.from({ length: 1000 }, newToken));
    expect(many.size).toBe(1000);
  });

  it('stores SHA-256 hex (checked against the well-known digest of "abc", FIPS 180-2 example)', () => {
    expect(hashToken('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });
});
