import type { Db, Tx } from '../../db/client';
import { setActor } from './events.repo';

/**
 * Names who makes the changes of this transaction, for the live events the database triggers write
 * (`by` in `GET /api/events`; migration 0016 reads the transaction-local setting `coilpath.actor`). Call it
 * inside the transaction, before the changes.
 */
export async function actAs(tx: Tx, userId: string): Promise<void> {
  await setActor(tx, userId);
}

/**
 * A change made as one statement, in a transaction of its own that names who makes it (a statement outside a
 * transaction could not carry the transaction-local setting to the triggers).
 */
export function changeAs<T>(db: Db, userId: string, change: (tx: Tx) => Promise<T>): Promise<T> {
  return db.transaction(async (tx) => {
    await actAs(tx, userId);
    return change(tx);
  });
}
