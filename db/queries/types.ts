/** What a query function runs on: the database or a transaction inside it. */
import type { Db } from '@/db/client';

export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
export type Queryable = Db | Tx;

/** A new random id (UUID v4), the form every table's `id` uses. */
export const newId = (): string => crypto.randomUUID();
