import { randomBytes, createHash, timingSafeEqual } from 'node:crypto';

/** 256-bit random token from the CSPRNG, URL-safe. */
export function newToken(): string {
  return randomBytes(32).toString('base64url');
}

/** Tokens are stored as SHA-256 hex; the plain token only ever travels to its owner. */
export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

/** Constant-time comparison of two strings (false for different lengths, never throws). */
export function safeEqual(a: string, b: string): boolean {
  const ba = Buffer.from(a, 'utf8');
  const bb = Buffer.from(b, 'utf8');
  if (ba.length !== bb.length) {
    timingSafeEqual(ba, ba);
    return false;
  }
  return timingSafeEqual(ba, bb);
}
