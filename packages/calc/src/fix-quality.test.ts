import { describe, expect, it } from 'vitest';
import { fixQuality, fixQualityBy, type FixQualityJob } from './fix-quality';

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
    });
  });

  it('includes a follow-up opened exactly windowDays later and excludes one a millisecond after', () => {
    const at = job({ id: 'x', firstVisitClosedAt: '2027-03-01T00:00:00.000Z', followUps: [{ kind: 'callback', openedAt: '2027-03-31T00:00:00.000Z' }] });
    const after = job({ id: 'y', firstVisitClosedAt: '2027-03-01T00:00:00.000Z', followUps: [{ kind: 'callback', openedAt: '2027-03-31T00:00:00.001Z' }] });
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

  it('groups with fixQualityBy', () => {
    const jobs = [{ ...job({ id: 'a' }), branch: 'N' }, { ...job({ id: 'b', firstVisitOutcome: 'needs_return' }), branch: 'S' }];
    const r = fixQualityBy(jobs, (j) => j.branch);
    expect(r.N?.firstTimeFixRate).toBe(1);
    expect(r.S?.firstTimeFixRate).toBe(0);
  });
});
