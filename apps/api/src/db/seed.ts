import { count, eq, sql } from 'drizzle-orm';
import { hashPassword } from '../auth/password';
import type { Db, Tx } from './client';
import * as schema from './schema';
import { isRefrigerantId, subcooling, superheat } from '@coilpath/calc';
import { buildScenario, type Rows } from './seed/scenario';
import { BRANCHES } from './seed/catalogue';

/** The one demo password, printed at start and shown on the sign-in page when demo data is loaded. */
export const DEMO_PASSWORD = 'coilpath-demo';

export interface SeedOptions {
  /** The day the scenario is anchored to (`YYYY-MM-DD`); defaults to today in the first demo branch's zone. */
  today?: string;
}

const CHUNK = 500;

async function insertAll(tx: Tx, table: Parameters<Tx['insert']>[0], values: object[]) {
  for (let i = 0; i < values.length; i += CHUNK) {
    await tx.insert(table).values(values.slice(i, i + CHUNK) as never);
  }
}

/** Tables in foreign-key order, each with its rows. */
function inOrder(rows: Rows): [Parameters<Tx['insert']>[0], object[]][] {
  return [
    [schema.branches, rows.branches],
    [schema.users, rows.users],
    [schema.customers, rows.customers],
    [schema.sites, rows.sites],
    [schema.units, rows.units],
    [schema.circuits, rows.circuits],
    [schema.agreements, rows.agreements],
    [schema.agreementUnits, rows.agreementUnits],
    [schema.workOrders, rows.workOrders],
    [schema.bookings, rows.bookings],
    [schema.visits, rows.visits],
    [schema.visitEvents, rows.visitEvents],
    [schema.readings, rows.readings.map(withDerivedValues)],
    [schema.findings, rows.findings],
    [schema.refrigerantEvents, rows.refrigerantEvents],
    [schema.leakCases, rows.leakCases],
    [schema.verificationTests, rows.verificationTests],
    [schema.alarms, rows.alarms],
    [schema.warrantyClaims, rows.warrantyClaims],
  ];
}

/**
 * Loads the invented demo scenario (docs/DESIGN.md §8). Deterministic apart from the anchoring date and
 * idempotent: a database that already holds demo data (or any branch) is left as it is.
 */
export async function seedDemo(db: Db, opts: SeedOptions = {}): Promise<{ seeded: boolean }> {
  const today = opts.today ?? demoToday(new Date());
  if (!/^\d{4}-\d{2}-\d{2}$/.test(today)) throw new Error(`seedDemo: today must be YYYY-MM-DD, got ${today}`);
  if (await alreadySeeded(db)) return { seeded: false };
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const rows = buildScenario(today, passwordHash);
  return db.transaction(async (tx) => {
    // Checked again inside the transaction so two processes starting together load it once at most.
    if (await alreadySeeded(tx)) return { seeded: false };
    for (const [table, values] of inOrder(rows)) await insertAll(tx, table, values);
    // Each closed visit's root cause is the first finding its story records (its findings exist only now).
    const marks = new Map<string, string>();
    for (const f of rows.findings) if (f.id && !marks.has(f.visitId)) marks.set(f.visitId, f.id);
    const pairs = JSON.stringify([...marks].map(([v, f]) => ({ v, f })));
    await tx.execute(
      sql`UPDATE visits SET root_cause_finding_id = m.f FROM jsonb_to_recordset(${pairs}::jsonb) AS m(v uuid, f uuid) WHERE visits.id = m.v AND visits.closed_at IS NOT NULL`,
    );
    await tx.insert(schema.appMeta).values({ key: 'demo_seeded', value: { today } });
    return { seeded: true };
  });
}

type ReadingRow = Rows['readings'][number];

/** Saturation temperatures, superheat and subcooling, computed with @coilpath/calc as the API does on save. */
function withDerivedValues(r: ReadingRow): ReadingRow {
  if (!isRefrigerantId(r.refrigerant)) return r;
  const out = { ...r };
  if (r.suctionPressure != null && r.suctionLineTemp != null) {
    try {
      const sh = superheat({ refrigerant: r.refrigerant, suctionPressure: r.suctionPressure, suctionLineTemp: r.suctionLineTemp });
      out.suctionSaturationTemp = Math.round(sh.saturationTemp * 10) / 10;
      out.superheat = Math.round(sh.superheat * 10) / 10;
    } catch {
      /* outside the refrigerant's table: left empty, as the API would refuse to guess */
    }
  }
  if (r.liquidPressure != null && r.liquidLineTemp != null) {
    try {
      const sc = subcooling({ refrigerant: r.refrigerant, liquidPressure: r.liquidPressure, liquidLineTemp: r.liquidLineTemp });
      out.liquidSaturationTemp = Math.round(sc.saturationTemp * 10) / 10;
      out.subcooling = Math.round(sc.subcooling * 10) / 10;
    } catch {
      /* as above */
    }
  }
  return out;
}

/**
 * The demo's anchoring day: today's date in the first demo branch's time zone, where the demo
 * sign-ins work. (The UTC date would put the Chicago technician's stops on tomorrow every evening.)
 */
export function demoToday(now: Date): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone: BRANCHES[0]!.timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(
    now,
  );
}

async function alreadySeeded(db: Tx): Promise<boolean> {
  const meta = await db.select({ key: schema.appMeta.key }).from(schema.appMeta).where(eq(schema.appMeta.key, 'demo_seeded')).limit(1);
  if (meta.length > 0) return true;
  const [branches] = await db.select({ n: count() }).from(schema.branches);
  return (branches?.n ?? 0) > 0;
}
