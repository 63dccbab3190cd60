const UNAVAILABLE_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'PROTOCOL_CONNECTION_LOST',
  'ETIMEDOUT',
  'EPIPE',
  'ENOTFOUND',
  'PROTOCOL_SEQUENCE_TIMEOUT',
  'ER_CON_COUNT_ERROR',
  'ER_SERVER_SHUTDOWN',
  'POOL_CLOSED',
  'ER_ACCESS_DENIED_ERROR',
]);

/** True when an error (or its cause chain) means MariaDB is unreachable, not that the query was wrong. */
export function isDbUnavailable(err: unknown): boolean {
  let e: unknown = err;
  for (let depth = 0; e && depth < 5; depth++) {
    const code = (e as { code?: string }).code;
    if (code && UNAVAILABLE_CODES.has(code)) return true;
    // The local instance's Unix socket is gone while it is stopped.
    if (code === 'ENOENT' && (e as { syscall?: string }).syscall === 'connect') return true;
    const msg = (e as { message?: string }).message ?? '';
    if (/connect ECONNREFUSED|connect ENOENT|Connection lost|closed state|Pool is closed|connect ETIMEDOUT/i.test(msg)) return true;
    e = (e as { cause?: unknown }).cause;
  }
  return false;
}

/** Deadlock / Galera certification failure: safe to retry the whole transaction. */
export function isRetryableTxError(err: unknown): boolean {
  let e: unknown = err;
  for (let depth = 0; e && depth < 5; depth++) {
    const errno = (e as { errno?: number }).errno;
    const code = (e as { code?: string }).code;
    if (errno === 1213 || errno === 1205 || code === 'ER_LOCK_DEADLOCK' || code === 'ER_LOCK_WAIT_TIMEOUT') return true;
    e = (e as { cause?: unknown }).cause;
  }
  return false;
}
