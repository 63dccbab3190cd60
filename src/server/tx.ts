/**
 * The one transaction type and the one retried-transaction helper every server module uses.
 */
import { getDb, type Db } from '../db/client';
import { isRetryableTxError } from './db-errors';

/** The transaction handed to `db.transaction(async (tx) => ...)`. */
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

function sleep(ms: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

/**
 * Run `fn` in a READ COMMITTED transaction, retrying a few times on deadlock / Galera
 * certification failure (the whole transaction is replayed, so `fn` must be pure apart
 * from its database writes).
 */
export async function inRetriedTransaction<T>(fn: (tx: Tx) => Promise<T>, attempts = 6): Promise<T> {
  const db = getDb();
  for (let attempt = 1; ; attempt++) {
    try {
      return await db.transaction(fn, { isolationLevel: 'read committed' });
    } catch (err) {
      if (attempt >= attempts || !isRetryableTxError(err)) throw err;
      await sleep(5 * attempt + Math.random() * 15 * attempt);
    }
  }
}
