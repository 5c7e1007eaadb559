/**
 * Migration 0017 (`*_root-cause-and-summary`) on a database loaded before root causes were marked: each closed
 * visit's root cause is backfilled to its earliest finding (by recorded time, then id), open visits and visits
 * without findings stay unmarked, notes become internal, and the Fix Quality facts and sums stay equal to a rebuild.
 * The migrations are applied in two steps (those before it from a copy of the folder, then the rest), on PGlite or,
 * with `DATABASE_URL`, on PostgreSQL.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import type { Database } from './client';
import { makeSiteWithUnit, makeUser, makeWorkOrder } from '../testing/fixtures';
import { databaseBefore } from '../testing/before-migration';

let database: Database;
let before: Awaited<ReturnType<typeof databaseBefore>>;

beforeAll(async () => {
  before = await databaseBefore('_root-cause-and-summary');
  database = before.database;
});
afterAll(() => before?.close());

type Rows<T> = { rows: T[] };
const one = async <T>(q: ReturnType<typeof sql>) => ((await database.db.execute(q)) as unknown as Rows<T>).rows;

describe('migration 0017 (root cause, note audience, contractor details)', () => {
  it('backfills each closed visit’s root cause to its earliest finding (time, then id) and keeps Fix Quality equal to a rebuild', async () => {
    const db = database.db;
    // Tables this migration changes are written with SQL, as the previous release has them.
    const [branch] = await one<{ id: string }>(
      sql`INSERT INTO branches (name, code, time_zone, base_lat, base_lon) VALUES ('Alpha', 'B1', 'America/Chicago', 41.88, -87.63) RETURNING id`,
    );
    const tech = await makeUser(db, 'technician', branch!.id);
    const p = await makeSiteWithUnit(db, branch!.id);
    const job = (at: string) => makeWorkOrder(db, { branchId: branch!.id, siteId: p.site.id, unitId: p.unit.id, createdAt: new Date(at) });
    const visit = async (woId: string, closedAt: string | null, notes: string | null) =>
      (
        await one<{ id: string }>(
          sql`INSERT INTO visits (branch_id, work_order_id, tech_id, closed_at, outcome, notes) VALUES (${branch!.id}, ${woId}, ${tech.id}, ${closedAt}::timestamptz, ${closedAt ? 'resolved' : null}, ${notes}) RETURNING id`,
        )
      )[0]!.id;
    const finding = async (id: string, visitId: string, cause: string, origin: string, at: string) =>
      one(
        sql`INSERT INTO findings (id, visit_id, unit_id, cause_code, origin, created_at, notes) VALUES (${id}, ${visitId}, ${p.unit.id}, ${cause}, ${origin}, ${at}::timestamptz, 'Warranty claim to file')`,
      );

    // J1, closed: typed 09:30 (settings), then two at 09:00 — the smaller id (…0001, airflow) is the earliest.
    const j1 = await job('2026-03-01T08:00:00Z');
    const v1 = await visit(j1.id, '2026-03-02T10:00:00Z', 'Bring a second tech next time');
    await finding('00000000-0000-4000-8000-000000000003', v1, 'settings', 'external', '2026-03-02T09:30:00Z');
    await finding('00000000-0000-4000-8000-000000000002', v1, 'wiring_fault', 'factory_defect', '2026-03-02T09:00:00Z');
    await finding('00000000-0000-4000-8000-000000000001', v1, 'airflow', 'wear', '2026-03-02T09:00:00Z');
    // J2, closed without findings; J3, open with a finding.
    const j2 = await job('2026-03-03T08:00:00Z');
    const v2 = await visit(j2.id, '2026-03-03T10:00:00Z', null);
    const j3 = await job('2026-03-04T08:00:00Z');
    const v3 = await visit(j3.id, null, null);
    await finding('00000000-0000-4000-8000-000000000004', v3, 'airflow', 'wear', '2026-03-04T09:00:00Z');
    const [old] = await one<{ cause_code: string }>(sql`SELECT cause_code FROM service_call_facts WHERE job_id = ${j1.id}`);

    await before.migrateRest();

    const marks = await one<{ id: string; root_cause_finding_id: string | null; notes_audience: string }>(
      sql`SELECT id, root_cause_finding_id, notes_audience FROM visits ORDER BY closed_at NULLS LAST`,
    );
    // The earliest by recorded time are the two at 09:00; of those the smaller id (…0001, airflow).
    expect(marks).toEqual([
      { id: v1, root_cause_finding_id: '00000000-0000-4000-8000-000000000001', notes_audience: 'internal' },
      { id: v2, root_cause_finding_id: null, notes_audience: 'internal' },
      { id: v3, root_cause_finding_id: null, notes_audience: 'internal' },
    ]);
    expect(await one(sql`SELECT DISTINCT notes_audience FROM findings`)).toEqual([{ notes_audience: 'internal' }]);

    // The facts take the marked root cause, which the backfill made the same cause as before.
    const facts = await one<{ job_id: string; cause_code: string | null; origin: string | null }>(
      sql`SELECT job_id, cause_code, origin FROM service_call_facts ORDER BY opened_at`,
    );
    expect(facts).toEqual([
      { job_id: j1.id, cause_code: 'airflow', origin: 'wear' },
      { job_id: j2.id, cause_code: null, origin: null },
      { job_id: j3.id, cause_code: null, origin: null },
    ]);
    expect(old!.cause_code).toBe('airflow');
    // Kept tables equal a rebuild under the new definition.
    const sums = () => one(sql`SELECT * FROM fix_quality_sums ORDER BY month, dim, tech_id, make, model, cause_code, origin`);
    const kept = await sums();
    expect(kept.length).toBeGreaterThan(0);
    await db.transaction(async (tx) => {
      await tx.execute(sql`SELECT rebuild_fix_quality_sums()`);
    });
    expect(await sums()).toEqual(kept);

    // A root cause must be one of the visit's own findings.
    await expect(
      db.execute(sql`UPDATE visits SET root_cause_finding_id = '00000000-0000-4000-8000-000000000004' WHERE id = ${v1}`),
    ).rejects.toMatchObject({
      cause: { code: '23503' },
    });
    // Re-marked on the wiring fault: the facts follow at once.
    await db.execute(sql`UPDATE visits SET root_cause_finding_id = '00000000-0000-4000-8000-000000000002' WHERE id = ${v1}`);
    const [after] = await one<{ cause_code: string; origin: string }>(
      sql`SELECT cause_code, origin FROM service_call_facts WHERE job_id = ${j1.id}`,
    );
    expect(after).toEqual({ cause_code: 'wiring_fault', origin: 'factory_defect' });
  });
});
