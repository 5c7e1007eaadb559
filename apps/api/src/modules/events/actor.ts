import { sql } from 'drizzle-orm';
import type { Tx } from '../../db/client';

/**
 * Names who makes the changes of this transaction, for the live events the database triggers write
 * (`by` in `GET /api/events`; migration 0016 reads the transaction-local setting `coilpath.actor`). Call it
 * inside the transaction, before the changes.
 */
export async function actAs(tx: Tx, userId: string): Promise<void> {
  await tx.execute(sql`select set_config('coilpath.actor', ${userId}, true)`);
}
