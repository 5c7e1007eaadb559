import { describe, expect, it } from 'vitest';
import { fixQuality, type FixQualityJob } from './fix-quality';

const job = (over: Partial<FixQualityJob> & { id: string }): FixQualityJob => ({
  kind: 'service_call',
  firstVisitOutcome: 'resolved',
  firstVisitClosedAt: '2027-03-01T15:00:00Z',
  followUps: [],
  ...over,
});

describe('fixQuality', () => {
  it('counts eligible, first-time fixes and callbacks', () => {
    const jobs = [
      job({ id: 'a' }), // fixed first time
      job({ id: 'b', followUps: [{ kind: 'callback', openedAt: '2027-03-10T09:00:00Z' }] }), // callback
      job({ id: 'c', followUps: [{ kind: 'return_visit', openedAt: new Date('2027-03-05T09:00:00Z') }] }), // return within window
      job({ id: 'd', firstVisitOutcome: 'needs_return' }), // eligible, not fixed
      job({ id: 'e', firstVisitOutcome: 'declined' }), // not eligible
      job({ id: 'f', kind: 'maintenance' }), // not eligible
      job({ id: 'g', followUps: [{ kind: 'callback', openedAt: '2027-04-15T09:00:00Z' }] }), // callback after the window
    ];
    expect(fixQuality(jobs)).toEqual({
      eligible: 5,
      firstTimeFixed: 2,
      firstTimeFixRate: 2 / 5,
      callbacks: 1,
      callbackRate: 1 / 4,
      resolvedFirstVisits: 4,
      pending: 0,
    });
  });

  it('counts a call whose callback window has not run out as pending, and nothing else (hand-worked)', () => {
    // Window 30 days (common practice, no source). "Now" is 2027-04-10 12:00 UTC; a call is mature once
    // now is past first close + 30 × 24 h.
    const asOf = '2027-04-10T12:00:00Z';
    const jobs = [
      // closed 03-01 15:00 → window ends 03-31 15:00, long past: mature, fixed the first time
      job({ id: 'old' }),
      // closed 03-11 11:59:59 → window ends 04-10 11:59:59, one second before now: mature, with a callback
      job({
        id: 'edge-mature',
        firstVisitClosedAt: '2027-03-11T11:59:59Z',
        followUps: [{ kind: 'callback', openedAt: '2027-03-20T08:00:00Z' }],
      }),
      // closed 03-11 12:00 → window ends exactly now: a callback opened this instant would still count: pending
      job({ id: 'edge-pending', firstVisitClosedAt: '2027-03-11T12:00:00Z' }),
      // closed 04-01 (day 9 of its window) resolved: pending although nothing came back yet
      job({ id: 'young', firstVisitClosedAt: '2027-04-01T10:00:00Z' }),
      // closed 04-02 and already called back: still pending (its figures wait for the window)
      job({
        id: 'young-cb',
        firstVisitClosedAt: '2027-04-02T10:00:00Z',
        followUps: [{ kind: 'callback', openedAt: '2027-04-05T10:00:00Z' }],
      }),
      // declined: neither eligible nor pending
      job({ id: 'declined', firstVisitOutcome: 'declined', firstVisitClosedAt: '2027-04-03T10:00:00Z' }),
    ];
    expect(fixQuality(jobs, { asOf })).toEqual({
      eligible: 2,
      firstTimeFixed: 1,
      firstTimeFixRate: 1 / 2,
      callbacks: 1,
      callbackRate: 1 / 2,
      resolvedFirstVisits: 2,
      pending: 3,
    });
    // Without "now" all five non-declined calls count, the young ones flattering the rate: 3 of 5 vs 1 of 2.
    expect(fixQuality(jobs)).toMatchObject({ eligible: 5, firstTimeFixed: 3, pending: 0 });
    // One millisecond later the boundary call matures.
    expect(fixQuality(jobs, { asOf: '2027-04-10T12:00:00.001Z' })).toMatchObject({ eligible: 3, firstTimeFixed: 2, pending: 2 });
  });

  it('includes a follow-up opened exactly windowDays later and excludes one a millisecond after', () => {
    const at = job({
      id: 'x',
      firstVisitClosedAt: '2027-03-01T00:00:00.000Z',
      followUps: [{ kind: 'callback', openedAt: '2027-03-31T00:00:00.000Z' }],
    });
    const after = job({
      id: 'y',
      firstVisitClosedAt: '2027-03-01T00:00:00.000Z',
      followUps: [{ kind: 'callback', openedAt: '2027-03-31T00:00:00.001Z' }],
    });
    expect(fixQuality([at]).callbacks).toBe(1);
    expect(fixQuality([after]).callbacks).toBe(0);
    expect(fixQuality([after], { windowDays: 31 }).callbacks).toBe(1);
  });

  it('gives null rates, not NaN, when nothing is eligible', () => {
    expect(fixQuality([])).toMatchObject({ eligible: 0, firstTimeFixRate: null, callbackRate: null });
    expect(fixQuality([job({ id: 'n', firstVisitOutcome: 'needs_return' })])).toMatchObject({ firstTimeFixRate: 0, callbackRate: null });
  });

  it('rejects bad instants and windows', () => {
    expect(() => fixQuality([job({ id: 'bad', firstVisitClosedAt: 'yesterday' })])).toThrow(RangeError);
    expect(() => fixQuality([], { windowDays: -1 })).toThrow(RangeError);
  });
});
