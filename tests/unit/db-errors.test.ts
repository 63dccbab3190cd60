import { describe, it, expect } from 'vitest';
import mysql from 'mysql2/promise';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { isDbUnavailable } from '../../src/server/db-errors';

/** Real connection failures from the real driver, classified as "database unavailable" (503), not as bugs (500). */
describe('database-unavailable classification', () => {
  it('a Unix socket that is not there (the local instance stopped)', async () => {
    const socketPath = join(mkdtempSync(join(tmpdir(), 'plateau-sock-')), 'gone.sock');
    const err = await mysql.createConnection({ socketPath, user: 'nobody', connectTimeout: 1000 }).then(
      () => null,
      (e: unknown) => e,
    );
    expect(err).not.toBeNull();
    expect(isDbUnavailable(err)).toBe(true);
  });

  it('a TCP port nobody listens on', async () => {
    const err = await mysql.createConnection({ host: '127.0.0.1', port: 9, user: 'nobody', connectTimeout: 1000 }).then(
      () => null,
      (e: unknown) => e,
    );
    expect(err).not.toBeNull();
    expect(isDbUnavailable(err)).toBe(true);
  });

  it('but not a file that is missing for another reason, nor a wrong query', () => {
    expect(isDbUnavailable(Object.assign(new Error("ENOENT: no such file or directory, open 'x.csv'"), { code: 'ENOENT', syscall: 'open' }))).toBe(false);
    expect(isDbUnavailable(Object.assign(new Error("Unknown column 'x'"), { code: 'ER_BAD_FIELD_ERROR', errno: 1054 }))).toBe(false);
  });
});
