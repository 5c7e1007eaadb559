/**
 * The Watchlist's daily digest: at each branch's `digestHour` (local time) the branch managers get
 * one e-mail listing leak cases with a deadline within 7 days (or overdue) and units that became
 * repeat-alarm units in the last 24 hours. Idempotent per branch and local day through `job_runs`
 * (INSERT … ON CONFLICT DO NOTHING); with several API processes the scheduler also runs it under a
 * PostgreSQL advisory lock (jobs/scheduler.ts), so only one process works on it at a time.
 */
import { TZDate } from '@date-fns/tz';
import { and, eq, isNull } from 'drizzle-orm';
import { DUE_SOON_DAYS, type SessionUser } from '@coilpath/contract';
import { zonedDate } from '@coilpath/calc';
import type { AppContext } from '../../context';
import { branches, jobRuns, users } from '../../db/schema';
import { scheduledJobs, type ScheduledJob } from '../../jobs/scheduler';
import { listLeakCases, repeatAlarmUnits } from './watchlist.service';

/** The job reads every branch; it acts as no person. */
const system: SessionUser = { id: '00000000-0000-0000-0000-000000000000', name: 'Coilpath', email: 'no-reply@coilpath.example', role: 'owner', branchId: null };

const whatLabels: Record<string, string> = {
  repair: 'repair',
  initial_verification: 'initial verification test',
  follow_up_verification: 'follow-up verification test',
  retrofit_retire_plan: 'retrofit/retirement plan',
  retrofit_retire_complete: 'retrofit/retirement done',
};

export interface DigestRun {
  branchId: string;
  runKey: string;
  status: 'sent' | 'nothing_to_report' | 'no_recipients' | 'already_ran' | 'not_due';
  recipients: string[];
}

/** Runs the digest for every branch whose local digest hour has come today. `now` defaults to the context's clock. */
export async function runDigest(ctx: AppContext, now: Date = ctx.clock.now()): Promise<DigestRun[]> {
  const list = await ctx.db.select().from(branches).where(isNull(branches.archivedAt));
  const runs: DigestRun[] = [];
  for (const b of list) {
    const day = zonedDate(now, b.timeZone);
    const runKey = `digest:${b.id}:${day}`;
    const hour = new TZDate(now.getTime(), b.timeZone).getHours();
    if (hour < b.digestHour) {
      runs.push({ branchId: b.id, runKey, status: 'not_due', recipients: [] });
      continue;
    }
    const claimed = await ctx.db.insert(jobRuns).values({ runKey, job: 'watchlist-digest', startedAt: now }).onConflictDoNothing().returning({ runKey: jobRuns.runKey });
    if (claimed.length === 0) {
      runs.push({ branchId: b.id, runKey, status: 'already_ran', recipients: [] });
      continue;
    }
    try {
      const run = await digestForBranch(ctx, b, day, now, runKey);
      await ctx.db.update(jobRuns).set({ finishedAt: ctx.clock.now(), result: { status: run.status, recipients: run.recipients.length } }).where(eq(jobRuns.runKey, runKey));
      runs.push(run);
    } catch (err) {
      // Not sent: release the day so the next tick tries again.
      await ctx.db.delete(jobRuns).where(eq(jobRuns.runKey, runKey));
      throw err;
    }
  }
  return runs;
}

async function digestForBranch(ctx: AppContext, b: typeof branches.$inferSelect, day: string, now: Date, runKey: string): Promise<DigestRun> {
  const managers = await ctx.db
    .select({ email: users.email, name: users.name })
    .from(users)
    .where(and(eq(users.branchId, b.id), eq(users.role, 'branch_manager'), eq(users.active, true)));
  const cases = (await listLeakCases(ctx, system, { branchId: b.id, status: 'active' })).filter((c) => c.next && c.next.daysLeft <= DUE_SOON_DAYS);
  const [today, yesterday] = await Promise.all([
    repeatAlarmUnits(ctx, [b], now),
    repeatAlarmUnits(ctx, [b], new Date(now.getTime() - 86_400_000)),
  ]);
  const before = new Set(yesterday.units.map((u) => `${u.unitId}|${u.code}`));
  const fresh = today.units.filter((u) => !before.has(`${u.unitId}|${u.code}`));
  if (cases.length === 0 && fresh.length === 0) return { branchId: b.id, runKey, status: 'nothing_to_report', recipients: [] };
  if (managers.length === 0) return { branchId: b.id, runKey, status: 'no_recipients', recipients: [] };

  const lines: string[] = [`Watchlist for ${b.name}, ${day}`, ''];
  lines.push(`Leak cases with a deadline within ${DUE_SOON_DAYS} days: ${cases.length}`);
  for (const c of cases) {
    const n = c.next!;
    const when = n.daysLeft < 0 ? `OVERDUE by ${-n.daysLeft} day${n.daysLeft === -1 ? '' : 's'}` : n.daysLeft === 0 ? 'due TODAY' : `due in ${n.daysLeft} day${n.daysLeft === 1 ? '' : 's'}`;
    lines.push(`- ${c.unitTag} at ${c.siteName} (${c.refrigerant}, leak rate ${c.leakRatePercent.toFixed(1)} % over ${c.thresholdPercent} %, ${c.rule}): ${whatLabels[n.what]} ${when} (${n.due})`);
  }
  lines.push('', `New repeat-alarm units (${b.repeatAlarmCount} or more of one code in ${b.repeatAlarmDays} days): ${fresh.length}`);
  for (const u of fresh) {
    lines.push(`- ${u.unitTag} at ${u.siteName}: alarm ${u.code} ${u.count} times since ${zonedDate(u.first, b.timeZone)}${u.circuitMismatch ? ' (a finding put the fault on another circuit than reported)' : ''}`);
  }
  lines.push('', `Open the Watchlist: ${ctx.config.publicUrl}/watchlist`);
  const text = lines.join('\n');
  const subject = `Coilpath Watchlist ${day}: ${cases.length} leak deadline${cases.length === 1 ? '' : 's'}, ${fresh.length} new repeat-alarm unit${fresh.length === 1 ? '' : 's'}`;
  for (const m of managers) await ctx.mailer.send({ to: m.email, subject, text });
  return { branchId: b.id, runKey, status: 'sent', recipients: managers.map((m) => m.email) };
}

export const digestJob: ScheduledJob = {
  name: 'watchlist-digest',
  async run(ctx) {
    const runs = await runDigest(ctx);
    const done = runs.filter((r) => r.status !== 'not_due');
    if (done.length) {
      const by = new Map<string, number>();
      for (const r of done) by.set(r.status, (by.get(r.status) ?? 0) + 1);
      console.log(`[coilpath] job watchlist-digest: ${[...by].map(([s, n]) => `${s} ${n}`).join(', ')}`);
    }
  },
};

/** Registered once per process (server.ts imports this file). */
if (!scheduledJobs.includes(digestJob)) scheduledJobs.push(digestJob);
