import type { Db } from './client';

/** The one demo password, printed at start and shown on the sign-in page when demo data is loaded. */
export const DEMO_PASSWORD = 'coilpath-demo';

export interface SeedOptions {
  /** The day the scenario is anchored to (`YYYY-MM-DD`, UTC); defaults to today. */
  today?: string;
}

/**
 * Loads the invented demo scenario (DESIGN §8). Deterministic apart from the anchoring date and
 * idempotent: a database that already holds demo data is left as it is.
 */
export async function seedDemo(_db: Db, _opts: SeedOptions = {}): Promise<{ seeded: boolean }> {
  return { seeded: false };
}
