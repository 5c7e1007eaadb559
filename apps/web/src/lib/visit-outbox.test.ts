import { describe, expect, it } from 'vitest';
import { recordingRefusal, type DayResponse, type VisitDetail } from '@coilpath/contract';
import { applyToDay, applyToVisit } from './visit-outbox';

// What the screens show of a write before the server has it. The rule for recording on a visit is
// Coilpath's own (`recordingRefusal`, the API's 409); the rest is the write's own values laid over the visit.

const at = '2026-12-07T15:04:00.000Z';

function visit(over: Partial<VisitDetail> = {}): VisitDetail {
  return {
    id: 'v1',
    techId: 't1',
    status: 'booked',
    enRouteAt: null,
    onSiteAt: null,
    closedAt: null,
    outcome: null,
    returnNeeds: [],
    canWrite: true,
    canRecord: false,
    recordRefusal: recordingRefusal('booked')!.message,
    branch: { elevationMeters: 180 } as VisitDetail['branch'],
    units: [{ id: 'u1', refrigerant: 'R-410A', circuits: [{ id: 'c1', number: 1 }] }] as unknown as VisitDetail['units'],
    readings: [],
    findings: [],
    refrigerantEvents: [],
    attachments: [],
    events: [],
    ...over,
  } as VisitDetail;
}

describe('a write laid over the kept visit', () => {
  it('shows a waiting close-out’s sign-off: the signature from the phone (a data URL), or not available', () => {
    const onSite = visit({ status: 'on_site', onSiteAt: at, signature: null });
    const png = 'iVBORw0KGgoAAAANSUhEUg';
    const signed = applyToVisit(
      onSite,
      {
        kind: 'close',
        visitId: 'v1',
        body: {
          outcome: 'resolved',
          signature: { kind: 'signed', signerName: ' Dana Whitfield ', imagePng: png, signedAt: '2026-12-07T15:01:00.000Z' },
        },
      },
      at,
    );
    expect(signed.signature).toEqual({
      kind: 'signed',
      signerName: 'Dana Whitfield',
      signedAt: '2026-12-07T15:01:00.000Z',
      imageUrl: `data:image/png;base64,${png}`,
    });
    const away = applyToVisit(
      onSite,
      { kind: 'close', visitId: 'v1', body: { outcome: 'resolved', signature: { kind: 'customer_not_available' } } },
      at,
    );
    expect(away.signature).toEqual({ kind: 'customer_not_available', recordedAt: at });
  });

  it('moves the state: en route, then on site opens recording; a repeated tap changes nothing', () => {
    const enRoute = applyToVisit(visit(), { kind: 'state', visitId: 'v1', body: { state: 'en_route' } }, at);
    expect(enRoute).toMatchObject({
      status: 'en_route',
      enRouteAt: at,
      canRecord: false,
      recordRefusal: recordingRefusal('en_route')!.message,
    });
    expect(enRoute.events).toEqual([{ state: 'en_route', at, byUserId: 't1' }]);
    expect(applyToVisit(enRoute, { kind: 'state', visitId: 'v1', body: { state: 'en_route' } }, at)).toBe(enRoute);
    const onSite = applyToVisit(enRoute, { kind: 'state', visitId: 'v1', body: { state: 'on_site' } }, at);
    expect(onSite).toMatchObject({ status: 'on_site', onSiteAt: at, canRecord: true, recordRefusal: null });
    // Never back from on site to en route.
    expect(applyToVisit(onSite, { kind: 'state', visitId: 'v1', body: { state: 'en_route' } }, at).status).toBe('on_site');
    // Another visit's write leaves this one alone.
    expect(applyToVisit(onSite, { kind: 'state', visitId: 'v2', body: { state: 'en_route' } }, at)).toBe(onSite);
  });

  it('adds a finding once, replaces a circuit’s reading, and closes with the outcome', () => {
    const v = visit({ status: 'on_site', canRecord: true, recordRefusal: null });
    const finding = {
      kind: 'finding' as const,
      visitId: 'v1',
      body: { id: 'f1', causeCode: 'refrigerant_leak' as const, origin: 'wear' as const },
    };
    const once = applyToVisit(v, finding, at);
    expect(once.findings.map((f) => f.id)).toEqual(['f1']);
    expect(applyToVisit(once, finding, at)).toBe(once);

    const saved = { ...v, readings: [{ id: 'r0', circuitId: 'c1', suctionPressure: 100 } as VisitDetail['readings'][number]] };
    const read = applyToVisit(
      saved,
      {
        kind: 'readings',
        visitId: 'v1',
        body: { units: { pressure: 'psig', temperature: 'F' }, readings: [{ circuitId: 'c1', suctionPressure: 118 }] },
      },
      at,
    );
    expect(read.readings).toHaveLength(1);
    expect(read.readings[0]).toMatchObject({
      circuitId: 'c1',
      circuitNumber: 1,
      suctionPressure: 118,
      superheat: null,
      elevationMeters: 180,
    });

    const closed = applyToVisit(read, { kind: 'close', visitId: 'v1', body: { outcome: 'needs_return', returnNeeds: ['parts'] } }, at);
    expect(closed).toMatchObject({
      status: 'closed',
      closedAt: at,
      outcome: 'needs_return',
      returnNeeds: ['parts'],
      canWrite: false,
      canRecord: false,
      recordRefusal: null,
    });
  });

  it('moves the stop on the kept route', () => {
    const day = {
      stops: [
        { visitId: 'v1', status: 'booked', enRouteAt: null, onSiteAt: null, closedAt: null, outcome: null },
        { visitId: 'v2', status: 'booked' },
      ],
    } as unknown as DayResponse;
    const next = applyToDay(day, { kind: 'state', visitId: 'v1', body: { state: 'en_route' } }, at);
    expect(next.stops.map((s) => s.status)).toEqual(['en_route', 'booked']);
    const closed = applyToDay(next, { kind: 'close', visitId: 'v1', body: { outcome: 'resolved' } }, at);
    expect(closed.stops[0]).toMatchObject({ status: 'closed', closedAt: at, outcome: 'resolved' });
    expect(applyToDay(day, { kind: 'finding', visitId: 'v1', body: { id: 'f1', causeCode: 'refrigerant_leak', origin: 'wear' } }, at)).toBe(
      day,
    );
  });
});
