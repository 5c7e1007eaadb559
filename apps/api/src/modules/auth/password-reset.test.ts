import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { and, eq } from 'drizzle-orm';
import { forgotPasswordAnswer } from '@coilpath/contract';
import type { Clock } from '../../lib/clock';
import { createTestApp, type TestApp } from '../../testing/harness';
import { makeTwoBranches, makeUser } from '../../testing/fixtures';
import { auditEvents } from '../../db/schema';
import { RESET_MAILS_PER_HOUR } from './password-reset.service';

/** A clock the test moves by hand. */
const clock: Clock & { at: Date; advance(minutes: number): void } = {
  at: new Date('2026-12-02T15:00:00Z'),
  now() {
    return new Date(this.at);
  },
  advance(minutes) {
    this.at = new Date(this.at.getTime() + minutes * 60_000);
  },
};

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;

beforeAll(async () => {
  t = await createTestApp({ clock });
  f = await makeTwoBranches(t.ctx.db);
});
afterAll(() => t.close());

const forgot = (email: string) => request(t.app).post('/api/auth/forgot-password').send({ email });
const mailsTo = (email: string) => t.mailer.sent.filter((m) => m.to === email).length;

describe('forgot-password', () => {
  it('answers before the work is done: the reset mail comes from the job that runs after the answer', async () => {
    const person = await makeUser(t.ctx.db, 'dispatcher', f.a.id);
    let release!: () => void;
    // A job queued ahead holds the queue: the answer must not wait for it.
    t.ctx.jobs.enqueue('held', () => new Promise<void>((r) => (release = r)));
    const res = await forgot(person.email);
    expect(res.status).toBe(202);
    expect(res.body).toEqual({ message: forgotPasswordAnswer });
    expect(mailsTo(person.email)).toBe(0);
    release();
    await t.ctx.jobs.idle();
    expect(mailsTo(person.email)).toBe(1);
    expect(t.mailer.sent.at(-1)!.subject).toBe('Choose a new Coilpath password');
  });

  it(`sends at most ${RESET_MAILS_PER_HOUR} reset e-mails per address per hour; the rest are dropped and audited`, async () => {
    const person = await makeUser(t.ctx.db, 'technician', f.b.id);
    const answers: unknown[] = [];
    for (let i = 0; i < 4; i++) {
      const res = await forgot(person.email);
      expect(res.status).toBe(202);
      answers.push(res.body);
      await t.ctx.jobs.idle();
      clock.advance(10);
    }
    // The fourth within the hour (at +30 min): the same answer, no e-mail, an audit event.
    expect(new Set(answers.map((a) => JSON.stringify(a))).size).toBe(1);
    expect(mailsTo(person.email)).toBe(3);
    const throttled = await t.ctx.db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.action, 'password_reset.throttled'), eq(auditEvents.entityId, person.id)));
    expect(throttled).toHaveLength(1);
    expect(throttled[0]!.details).toEqual({ sentInLastHour: 3, limit: 3 });

    // An hour after the first (now +60 min and a bit), one link has left the hour: one more may go.
    clock.advance(21);
    await forgot(person.email);
    await t.ctx.jobs.idle();
    expect(mailsTo(person.email)).toBe(4);
  });

  it('takes as long for an unknown address as for a real one (median of 25 each, ratio under 1.5)', async () => {
    // The answer must not reveal, by its time, whether the account exists.
    // The client here shares the server's thread, so the job that runs after the answer would be timed with it
    // (a remote client has the answer by then): the queue is held while a request is timed and the job runs
    // after the stopwatch stops. Samples alternate, the first ones warm up, and medians are compared so that
    // one slow sample (the machine is shared) cannot decide it.
    const person = await makeUser(t.ctx.db, 'branch_manager', f.a.id);
    const time = async (email: string) => {
      let release!: () => void;
      t.ctx.jobs.enqueue('held', () => new Promise<void>((r) => (release = r)));
      const start = process.hrtime.bigint();
      const res = await forgot(email);
      const ms = Number(process.hrtime.bigint() - start) / 1e6;
      expect(res.status).toBe(202);
      release();
      await t.ctx.jobs.idle();
      clock.advance(30); // keeps the real address under the hourly limit, so each of its jobs does the whole work
      return ms;
    };
    for (let i = 0; i < 5; i++) {
      await time(person.email);
      await time(`warm-up-${i}@test.example`);
    }
    const real: number[] = [];
    const unknown: number[] = [];
    for (let i = 0; i < 25; i++) {
      real.push(await time(person.email));
      unknown.push(await time(`nobody-${i}@test.example`));
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
    const ratio = median(real) / median(unknown);
    expect(ratio).toBeLessThan(1.5);
    expect(mailsTo(person.email)).toBe(30);
  });
});
