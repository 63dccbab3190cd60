import { hash, verify } from '@node-rs/argon2';

/**
 * Every argon2 parameter lives here. argon2id at or above the OWASP Password Storage
 * Cheat Sheet floor (m = 19456 KiB, t = 2, p = 1). Raising these makes sign-in rehash.
 */
export const ARGON2_PARAMS = {
  algorithm: 2 as const, // Algorithm.Argon2id
  memoryCost: 19456,
  timeCost: 2,
  parallelism: 1,
  outputLen: 32,
};

export async function hashPassword(password: string): Promise<string> {
  return hash(password, ARGON2_PARAMS);
}

export async function verifyPassword(storedHash: string, password: string): Promise<boolean> {
  try {
    return await verify(storedHash, password);
  } catch {
    return false;
  }
}

/** True when a stored hash was made with weaker parameters than today's. */
export function needsRehash(storedHash: string): boolean {
  const m = /^\$argon2(id|i|d)\$v=\d+\$m=(\d+),t=(\d+),p=(\d+)\$/.exec(storedHash);
  if (!m) return true;
  const [, variant, mem, time, par] = m;
  return variant !== 'id' || Number(mem) < ARGON2_PARAMS.memoryCost || Number(time) < ARGON2_PARAMS.timeCost || Number(par) < ARGON2_PARAMS.parallelism;
}

/** A dummy hash verified when the e-mail is unknown, so timing does not reveal accounts. */
let dummyHash: Promise<string> | null = null;
export function dummyPasswordHash(): Promise<string> {
  dummyHash ??= hashPassword('not-a-real-password-' + Math.random());
  return dummyHash;
}
