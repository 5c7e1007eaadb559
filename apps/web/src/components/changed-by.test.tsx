/**
 * "Changed by Ana just now" where a dispatcher or manager sees the changed record: a Roster calendar event
 * (its description, since the event's name is its aria-label), the unplaced queue, and the Watchlist's
 * repeat-alarm, return-visit and leak-case rows. Rendered to HTML with react-dom/server (no browser); the note
 * comes from a live event as the stream delivers it (`applyLiveEvent`), and goes after a minute of the app's clock.
 */
import { describe, expect, it } from 'vitest';
import { renderToStaticMarkup } from 'react-dom/server';
import type { ReactNode } from 'react';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import type { Booking, LeakCaseRow, LiveEvent, RepeatAlarmResponse, ReturnVisitRow, WorkOrder } from '@coilpath/contract';
import { NoticesProvider } from '@/components/ui/notices';
import { applyLiveEvent, CHANGED_BY_MS } from '@/lib/live-events';
import { appNowMs, noteServerNow } from '@/lib/now';
import { EventBody } from '@/features/roster/parts';
import { QueueItem } from '@/features/roster/unplaced-queue';
import { LeakCaseCard } from '@/features/watchlist/leak-cases';
import { RepeatAlarmsSection, ReturnVisitsSection } from '@/features/watchlist/sections';
import { changedByNoteId } from './changed-by';

const BRANCH = '00000000-0000-4000-8000-000000000001';
const ME = { id: '00000000-0000-4000-8000-0000000000d2', name: 'Priya Venkatesh' };
const ANA = { id: '00000000-0000-4000-8000-0000000000d1', name: 'Ana Lindqvist' };
const tz = 'America/Chicago';

const wrap = (node: ReactNode, client = new QueryClient()) =>
  renderToStaticMarkup(
    <QueryClientProvider client={client}>
      <NoticesProvider>{node}</NoticesProvider>
    </QueryClientProvider>,
  );
const text = (html: string) =>
  html
    .replace(/<[^>]+>/g, ' ')
    .replace(/\s+/g, ' ')
    .trim();
const said = 'Changed by Ana just now';

/** A live event as the stream delivers it to this screen (signed in as ME). */
let nextId = 1;
const hear = (e: Partial<LiveEvent> & Pick<LiveEvent, 'kind'>, by = ANA) =>
  applyLiveEvent(
    { id: nextId++, branchId: BRANCH, at: '2027-03-09T14:00:00.000Z', by, bookings: [], workOrders: [], revision: 1, ...e } as LiveEvent,
    ME.id,
    () => undefined,
  );

function booking(id: string): Booking {
  return {
    id,
    branchId: BRANCH,
    workOrderId: '00000000-0000-4000-9000-000000000101',
    techId: '00000000-0000-4000-8000-00000000000a',
    startAt: '2027-03-09T15:00:00.000Z',
    endAt: '2027-03-09T16:00:00.000Z',
    version: 1,
    fixed: false,
    hoursOverride: false,
    overrideRules: [],
    overrideReason: null,
    overrideBy: null,
    visitId: null,
    workOrder: {
      number: 10101,
      kind: 'service_call',
      state: 'booked',
      priority: 'normal',
      complaint: 'Walk-in cooler warm',
      siteName: 'Harbor Deli',
      unitTag: 'WIC-1',
      unitMake: 'Coldline',
      unitModel: 'CL-40',
      requiredSkill: null,
      requiredCertification: null,
      estimatedMinutes: 60,
      dueAt: null,
      leakRepairDueDate: null,
    },
  };
}

function workOrder(id: string): WorkOrder {
  return {
    id,
    number: 10202,
    branchId: BRANCH,
    siteId: '00000000-0000-4000-8000-000000000301',
    siteName: 'Harbor Deli',
    siteAddress: '1 Pier Road',
    siteLat: 41.9,
    siteLon: -87.6,
    unitId: null,
    unitTag: null,
    unitMake: null,
    unitModel: null,
    unitRefrigerant: null,
    kind: 'service_call',
    state: 'unplaced',
    priority: 'normal',
    complaint: 'Freezer down',
    requestedFrom: null,
    requestedTo: null,
    slaDueAt: null,
    latestAt: null,
    plannedDate: null,
    requiredSkill: null,
    requiredCertification: null,
    estimatedMinutes: 60,
    originWorkOrderId: null,
    originNumber: null,
    leakCaseId: null,
    leakRepairDueDate: null,
    modelAlert: null,
    booking: null,
    createdAt: '2027-03-09T13:00:00.000Z',
    updatedAt: '2027-03-09T13:00:00.000Z',
  };
}

describe('the Roster’s calendar event', () => {
  const render = (b: Booking) =>
    renderToStaticMarkup(<EventBody booking={b} tech={undefined} showTech={false} timeZone={tz} today="2027-03-08" compact={false} />);

  it('says who else moved its booking, in the element its aria-describedby names', () => {
    const b = booking('00000000-0000-4000-8000-000000000b01');
    expect(text(render(b))).not.toContain('Changed by');
    hear({ kind: 'roster', bookings: [b.id] });
    const html = render(b);
    expect(text(html)).toContain(said);
    expect(html).toContain(`id="${changedByNoteId('booking', b.id)}"`);
  });

  it('says nothing for one’s own move, or a change by no person', () => {
    const mine = booking('00000000-0000-4000-8000-000000000b02');
    hear({ kind: 'roster', bookings: [mine.id] }, ME);
    expect(text(render(mine))).not.toContain('Changed by');
    const byJob = booking('00000000-0000-4000-8000-000000000b03');
    hear({ kind: 'roster', bookings: [byJob.id] }, null as never);
    expect(text(render(byJob))).not.toContain('Changed by');
  });

  it('fades a minute later by the app’s clock', () => {
    const b = booking('00000000-0000-4000-8000-000000000b04');
    hear({ kind: 'roster', bookings: [b.id] });
    expect(text(render(b))).toContain(said);
    const browser = Date.now();
    noteServerNow(new Date(appNowMs() + CHANGED_BY_MS + 1000).toISOString(), browser);
    try {
      expect(text(render(b))).not.toContain('Changed by');
    } finally {
      noteServerNow(new Date(browser).toISOString(), browser);
    }
  });
});

describe('the unplaced queue', () => {
  it('says who else changed a queued work order', () => {
    const w = workOrder('00000000-0000-4000-9000-000000000c01');
    const render = () =>
      text(
        renderToStaticMarkup(
          <QueueItem
            w={w}
            timeZone={tz}
            today="2027-03-09"
            now={Date.parse('2027-03-09T14:00:00Z')}
            onBook={() => undefined}
            mode="calendar"
            picked={false}
            onPick={() => undefined}
          />,
        ),
      );
    expect(render()).not.toContain('Changed by');
    hear({ kind: 'roster', workOrders: [w.id] });
    expect(render()).toContain(`WO-10202 Service call`);
    expect(render()).toContain(said);
  });
});

describe('the Watchlist', () => {
  it('says who else recorded an alarm on a repeat-alarm unit', () => {
    const unitId = '00000000-0000-4000-8000-000000000e01';
    const client = new QueryClient();
    const data: RepeatAlarmResponse = {
      asOf: '2027-03-09T14:00:00.000Z',
      rules: [{ branchId: BRANCH, minCount: 2, windowDays: 30 }],
      units: [
        {
          unitId,
          branchId: BRANCH,
          unitTag: 'RTU-7',
          make: 'Testmake',
          model: 'TM-1',
          serial: 'SN-7',
          siteId: 'site-1',
          siteName: 'Harbor Deli',
          code: 'HP-1',
          count: 2,
          first: '2027-03-01T10:00:00.000Z',
          last: '2027-03-09T10:00:00.000Z',
          circuits: [1],
          circuitMismatch: false,
          visits: [],
          findings: [],
        },
      ],
    };
    client.setQueryData(['watchlist', BRANCH, 'repeat-alarms'], data);
    const render = () => text(wrap(<RepeatAlarmsSection branchId={BRANCH} timeZone={tz} />, client));
    expect(render()).toContain('RTU-7');
    expect(render()).not.toContain('Changed by');
    hear({ kind: 'alarm', units: [unitId] } as Partial<LiveEvent> & { kind: 'alarm' });
    expect(render()).toContain(said);
  });

  it('says who else queued a return visit', () => {
    const workOrderId = '00000000-0000-4000-9000-000000000f01';
    const client = new QueryClient();
    const rows: ReturnVisitRow[] = [
      {
        workOrderId,
        number: 10303,
        branchId: BRANCH,
        siteName: 'Harbor Deli',
        unitId: null,
        unitTag: 'WIC-1',
        priority: 'normal',
        latestAt: null,
        createdAt: '2027-03-09T13:00:00.000Z',
        complaint: 'Parts',
        returnNeeds: ['parts'],
        returnNotes: null,
        origin: null,
      },
    ];
    client.setQueryData(['watchlist', BRANCH, 'return-visits'], rows);
    const render = () => text(wrap(<ReturnVisitsSection branchId={BRANCH} timeZone={tz} />, client));
    expect(render()).toContain('return WO-10303');
    expect(render()).not.toContain('Changed by');
    hear({ kind: 'roster', workOrders: [workOrderId] });
    expect(render()).toContain(said);
  });

  it('says who else changed a leak case', () => {
    const c: LeakCaseRow = {
      id: '00000000-0000-4000-8000-000000000a01',
      branchId: BRANCH,
      unitId: 'unit-1',
      unitTag: 'RTU-9',
      siteName: 'Harbor Deli',
      make: 'Testmake',
      model: 'TM-1',
      refrigerant: 'R-410A',
      fullChargeLb: 20,
      rule: 'comfort_cooling',
      method: 'annualizing',
      thresholdPercent: 10,
      leakRatePercent: 24,
      openedOn: '2027-02-20',
      repairDueDate: '2027-03-22',
      repairedOn: null,
      chronic: false,
      status: 'open',
      obligationState: null,
      planKind: null,
      planDueDate: null,
      notes: null,
      repairWorkOrder: null,
      tests: [],
      deadlines: [],
      next: null,
      requiredCertification: 'II',
      today: '2027-03-09',
    };
    const render = () => text(wrap(<LeakCaseCard c={c} />));
    expect(render()).toContain('RTU-9');
    expect(render()).not.toContain('Changed by');
    hear({ kind: 'leak-case', leakCases: [c.id] } as Partial<LiveEvent> & { kind: 'leak-case' });
    expect(render()).toContain(said);
  });
});
