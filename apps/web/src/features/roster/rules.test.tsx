/**
 * The booking rules on the Roster's screens: the override on a booking's chip (board and calendar) and
 * the booking form's warning before the dispatcher confirms. Components are rendered to HTML with
 * react-dom/server (no browser needed); effects do not run, so no request is made.
 */
import { describe, expect, it } from 'vitest';
import { renderToStaticMarkup } from 'react-dom/server';
import type { ReactNode } from 'react';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import type { Booking, Technician, WorkOrder } from '@coilpath/contract';
import { NoticesProvider } from '@/components/ui/notices';
import { ApiError } from '@/lib/api-client';
import { cellKey, groupBookings } from './board';
import { chipSuffix, TechBoard } from './board-view';
import { BookDialog, unproposedText } from './book-dialog';
import { BookingDialog } from './booking-dialog';
import { EventBody, eventNameExtras } from './parts';
import { offeredRules, overrideSummary, placementBreaches, refusedRules, workRuleJob } from './rules';

/* America/Chicago, CST = UTC−6 in early March 2027. Tuesday 2027-03-09: 09:00 CST = 15:00Z. */
const tz = 'America/Chicago';
const hours = { start: '07:00', end: '15:30' };
const ana: Technician = {
  id: '00000000-0000-4000-8000-00000000000a',
  name: 'Ana Ruiz',
  colorIndex: 1,
  epa608Type: 'I',
  skills: ['rooftop'],
  workingHours: { sun: null, mon: hours, tue: hours, wed: hours, thu: hours, fri: hours, sat: null },
  startLat: null,
  startLon: null,
};

function booking(over: Partial<Booking> = {}, wo: Partial<Booking['workOrder']> = {}): Booking {
  return {
    id: '00000000-0000-4000-8000-000000000101',
    branchId: '00000000-0000-4000-8000-000000000001',
    workOrderId: '00000000-0000-4000-9000-000000000101',
    techId: ana.id,
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
      priority: 'high',
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
      ...wo,
    },
    ...over,
  };
}

const overridden = booking({
  overrideRules: ['skill', 'due_time'],
  overrideReason: 'Only Ana can reach the site today',
  overrideBy: { id: '00000000-0000-4000-8000-0000000000d1', name: 'Dana Pruitt' },
});

function workOrder(over: Partial<WorkOrder> = {}): WorkOrder {
  return {
    id: '00000000-0000-4000-9000-000000000202',
    number: 10202,
    branchId: '00000000-0000-4000-8000-000000000001',
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
    priority: 'emergency',
    complaint: 'Freezer down',
    requestedFrom: null,
    requestedTo: null,
    slaDueAt: '2027-03-09T17:00:00.000Z', // Tue 11:00 CST
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
    ...over,
  };
}

const wrap = (node: ReactNode) =>
  renderToStaticMarkup(
    <QueryClientProvider client={new QueryClient()}>
      <NoticesProvider>{node}</NoticesProvider>
    </QueryClientProvider>,
  );
/** Markup as text: tags out, entities read, spaces folded. */
const text = (html: string) =>
  html
    .replace(/<[^>]+>/g, ' ')
    .replace(/&quot;/g, '"')
    .replace(/&#x27;/g, "'")
    .replace(/&amp;/g, '&')
    .replace(/\s+/g, ' ')
    .trim();

describe('the override on a booking', () => {
  it('summarises the rules, the reason and who; nothing when every rule is kept', () => {
    expect(overrideSummary(overridden)).toEqual({
      badge: 'Override: required skill and due time',
      reason: 'Only Ana can reach the site today',
      sentence: 'Booked against the required skill and due time by Dana Pruitt: “Only Ana can reach the site today”',
    });
    expect(overrideSummary(booking())).toBeNull();
  });

  it('shows on the board chip: the badge, the reason, and both in the chip’s spoken text', () => {
    const days = ['2027-03-08', '2027-03-09', '2027-03-10', '2027-03-11', '2027-03-12', '2027-03-13', '2027-03-14'];
    const render = (b: Booking) =>
      wrap(
        <TechBoard
          techs={[ana]}
          days={days}
          day="2027-03-09"
          today="2027-03-08"
          timeZone={tz}
          cells={groupBookings([b], tz, days)}
          load={undefined}
          placing={null}
          onOpen={() => {}}
          onOpenDay={() => {}}
          onPlace={() => {}}
          onMoveTo={() => {}}
          onPickDay={() => {}}
          onCancelPlacing={() => {}}
        />,
      );
    const html = render(overridden);
    const chip = text(html.slice(html.indexOf('data-chip=')));
    expect(html).toContain('data-testid="chip-override"');
    expect(chip).toContain('Override: required skill and due time');
    expect(chip).toContain('“Only Ana can reach the site today”');
    expect(chip).toContain('Booked against the required skill and due time by Dana Pruitt: “Only Ana can reach the site today”');
    const plain = render(booking());
    expect(plain).toContain('data-chip=');
    expect(plain).not.toContain('chip-override');
    expect(text(plain)).not.toMatch(/Override|Booked against/);
  });

  it('shows on the calendar event and in its name', () => {
    const full = text(
      renderToStaticMarkup(<EventBody booking={overridden} tech={ana} showTech timeZone={tz} today="2027-03-08" compact={false} />),
    );
    expect(full).toContain('override: required skill and due time');
    expect(full).toContain('“Only Ana can reach the site today”');
    const compact = text(
      renderToStaticMarkup(<EventBody booking={overridden} tech={ana} showTech timeZone={tz} today="2027-03-08" compact />),
    );
    expect(compact).toContain('· override');
    expect(eventNameExtras(overridden)).toBe(
      ' Booked against the required skill and due time by Dana Pruitt: “Only Ana can reach the site today”.',
    );
    expect(eventNameExtras(booking())).toBe('');
    expect(chipSuffix(groupBookings([booking()], tz, ['2027-03-09']).get(`${ana.id}|2027-03-09`)![0]!, '2027-03-08', true)).not.toMatch(
      /Booked against/,
    );
  });

  it('shows in the booking’s details, with the work order’s due time, and its rules come ticked', () => {
    const { overrideRules, overrideReason, overrideBy } = overridden;
    const b = booking({ overrideRules, overrideReason, overrideBy }, { dueAt: '2027-03-09T14:00:00.000Z' });
    const html = wrap(<BookingDialog edit={{ booking: b }} techs={[ana]} timeZone={tz} today="2027-03-08" onClose={() => {}} />);
    const t = text(html);
    expect(t).toContain('Override Booked against the required skill and due time by Dana Pruitt: “Only Ana can reach the site today”');
    expect(t).toContain('Due Tue 9 Mar, 08:00');
    expect(html).toContain('data-testid="rule-override"');
    expect(t).toContain('Book against the required skill anyway');
    expect(t).toContain('Book against the due time anyway');
    expect(html.match(/type="checkbox"[^>]*checked=""/g)).toHaveLength(2);
    expect(t).toContain('Why (kept with the booking and shown on it)');
  });
});

describe('the booking form warns before the dispatcher confirms', () => {
  it('names the due time a start after it breaks, and offers to book against it with a reason', () => {
    const html = wrap(
      <BookDialog
        workOrder={workOrder()}
        techs={[ana]}
        timeZone={tz}
        initial={{ techId: ana.id, date: '2027-03-09', time: '11:30' }}
        onClose={() => {}}
      />,
    );
    const t = text(html);
    expect(html).toContain('data-testid="rule-override"');
    expect(t).toContain(
      'Breaks the due time: This work is due by Tuesday, March 9 at 11:00 (America/Chicago); this booking starts Tuesday, March 9 at 11:30, after it.',
    );
    expect(t).toContain('Book against the due time anyway');
  });

  it('says nothing when the chosen time keeps every rule', () => {
    const html = wrap(
      <BookDialog
        workOrder={workOrder()}
        techs={[ana]}
        timeZone={tz}
        initial={{ techId: ana.id, date: '2027-03-09', time: '10:00' }}
        onClose={() => {}}
      />,
    );
    expect(html).not.toContain('data-testid="rule-override"');
    expect(text(html)).not.toMatch(/Breaks the/);
  });

  it('warns of every rule the technician and time break, in the API’s words', () => {
    const w = workOrder({ slaDueAt: null, latestAt: '2027-03-10T05:59:00.000Z', requiredSkill: 'chiller', requiredCertification: 'II' });
    const breaches = placementBreaches(workRuleJob(w), ana, tz, '2027-03-10T22:00:00.000Z', '2027-03-10T23:00:00.000Z');
    expect(breaches.map((b) => b.rule)).toEqual(['skill', 'certification', 'working_hours', 'due_time']);
    const html = wrap(
      <BookDialog
        workOrder={w}
        techs={[ana]}
        timeZone={tz}
        initial={{ techId: ana.id, date: '2027-03-10', time: '16:00' }}
        onClose={() => {}}
      />,
    );
    for (const b of breaches) expect(text(html)).toContain(b.message);
    expect(placementBreaches(workRuleJob(w), undefined, tz, '2027-03-10T22:00:00.000Z', '2027-03-10T23:00:00.000Z')).toEqual([]);
  });

  it('offers the rules the API refused, read from its answer', () => {
    const refusal = new ApiError(409, 'booking_rules', 'Refused', { rule: 'skill', rules: ['skill', 'due_time'], breaches: [] });
    expect(refusedRules(refusal)).toEqual(['skill', 'due_time']);
    expect(refusedRules(new ApiError(409, 'overlap', 'Clash', { rule: 'overlap', bookingId: 'x' }))).toEqual([]);
    expect(refusedRules(new Error('network'))).toEqual([]);
    expect(offeredRules([], ['due_time'], ['skill'])).toEqual(['skill', 'due_time']);
    const html = wrap(
      <BookDialog
        workOrder={workOrder({ slaDueAt: null })}
        techs={[ana]}
        timeZone={tz}
        initial={{ techId: ana.id, date: '2027-03-09', time: '10:00', error: 'Ana Ruiz lacks the skill …', refusedRules: ['skill'] }}
        onClose={() => {}}
      />,
    );
    expect(text(html)).toContain('Book against the required skill anyway');
    expect(text(html)).toContain('Ana Ruiz lacks the skill …');
  });

  it('says "no free time" only when free time is what is missing', () => {
    expect(
      unproposedText({
        name: 'Ana Ruiz',
        blockedBy: ['free_time'],
        reasons: ['No free slot of 1 h on 2027-03-09 (30 min free)', '30 min free'],
      }),
    ).toBe(
      'Ana Ruiz has no free time for this job that day: No free slot of 1 h on 2027-03-09 (30 min free). Pick another technician or day, or set a time.',
    );
    const rule = unproposedText({
      name: 'Ana Ruiz',
      blockedBy: ['skill'],
      reasons: ['Lacks the skill "chiller"', 'EPA 608 Universal covers the Type II refrigerant work'],
    });
    expect(rule).toBe(
      'Ana Ruiz is not proposed for this job that day: Lacks the skill "chiller". Pick another technician or day, or book against the rule with a reason.',
    );
    expect(rule).not.toMatch(/free time/);
  });
});

describe('a day nobody works on the board', () => {
  // WCAG 2.5.3 "Label in Name": the words a quiet day's head shows are part of its spoken name,
  // a branch holiday included (it once showed "Off" while its name said "Holiday").
  it('shows a word of its name: "Holiday" on the branch holiday, "Off" on a day off', () => {
    const days = ['2027-03-08', '2027-03-09', '2027-03-10', '2027-03-11', '2027-03-12', '2027-03-13', '2027-03-14'];
    const load = new Map(
      days.map((d, i) => {
        const holiday = d === '2027-03-12';
        const capacity = holiday || i >= 5 ? 0 : 510;
        return [
          cellKey(ana.id, d),
          { techId: ana.id, day: d, bookedMinutes: 0, capacityMinutes: capacity, ratio: capacity ? 0 : null, overloaded: false, holiday },
        ];
      }),
    );
    const html = wrap(
      <TechBoard
        techs={[ana]}
        days={days}
        day="2027-03-09"
        today="2027-03-08"
        timeZone={tz}
        cells={groupBookings([], tz, days)}
        load={load}
        placing={null}
        onOpen={() => {}}
        onOpenDay={() => {}}
        onPlace={() => {}}
        onMoveTo={() => {}}
        onPickDay={() => {}}
        onCancelPlacing={() => {}}
      />,
    );
    const head = (col: number) => {
      const m = new RegExp(`<button[^>]*data-nav-head="0:${col}"[^>]*>([\\s\\S]*?)</button>`).exec(html);
      expect(m, `the head of column ${col}`).not.toBeNull();
      return { label: /aria-label="([^"]*)"/.exec(m![0])![1]!, shown: text(m![1]!) };
    };
    const holiday = head(4);
    expect(holiday.shown).toBe('Holiday');
    expect(holiday.label.toLowerCase()).toContain(holiday.shown.toLowerCase());
    const off = head(5);
    expect(off.shown).toBe('Off');
    expect(off.label.toLowerCase()).toContain(off.shown.toLowerCase());
  });
});
