import { randomBytes, createHash } from 'node:crypto';

/** 256-bit random token from the CSPRNG, URL-safe. */
export function newToken(): string {
  return randomBytes(32).toString('base64url');
}

/** Tokens are stored as SHA-256 hex; the plain token only ever travels to its owner. */
export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}
