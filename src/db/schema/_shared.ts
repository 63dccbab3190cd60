import { bigint, datetime } from 'drizzle-orm/mysql-core';
import { sql } from 'drizzle-orm';

/** A foreign key to a `serial` id: BIGINT UNSIGNED, same type as the referenced key. */
export const fk = (name: string) => bigint(name, { mode: 'number', unsigned: true });

/** Times are stored in UTC with millisecond precision. */
export const utc = (name: string) => datetime(name, { mode: 'date', fsp: 3 });

export const timestamps = {
  createdAt: utc('created_at')
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`),
  updatedAt: utc('updated_at')
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`)
    .$onUpdate(() => new Date()),
};

/** Surrogate key: BIGINT UNSIGNED AUTO_INCREMENT (MariaDB rejects drizzle's `serial AUTO_INCREMENT`). */
export const id = () => bigint('id', { mode: 'number', unsigned: true }).autoincrement().primaryKey();
