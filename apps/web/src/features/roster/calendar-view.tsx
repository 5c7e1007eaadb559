/**
 * The Roster's time grids (day, week) and month grid on FullCalendar. Loaded on its own (React.lazy)
 * the first time one of these views is chosen, so the technician board opens without the calendar.
 * The page owns the view and the date (they live in the URL); the calendar follows them.
 */
import { useEffect, useMemo, useRef } from 'react';
import FullCalendar from '@fullcalendar/react';
import timeGridPlugin from '@fullcalendar/timegrid';
import dayGridPlugin from '@fullcalendar/daygrid';
import interactionPlugin, { type DropArg, type EventResizeDoneArg } from '@fullcalendar/interaction';
import type { BusinessHoursInput, EventClickArg, EventContentArg, EventDropArg, EventInput } from '@fullcalendar/core';
import type { Booking, Technician } from '@coilpath/contract';
import { weekdays } from '@coilpath/contract/vocabulary';
import type { RosterView } from './board';
import { bookingSummary, colourOf, EventBody, eventNameExtras } from './parts';
import { movedTimes, toWallClock } from './zone';
import { appNowMs } from '@/lib/now';
import { changedByNoteId } from '@/components/changed-by';

type CalendarViewName = 'timeGridDay' | 'timeGridWeek' | 'dayGridMonth';
const fcView: Record<Exclude<RosterView, 'board'>, CalendarViewName> = { day: 'timeGridDay', week: 'timeGridWeek', month: 'dayGridMonth' };

function businessHoursOf(t: Technician | undefined): BusinessHoursInput {
  if (!t?.workingHours) return false;
  const wh = t.workingHours;
  return weekdays.flatMap((d, i) => {
    const h = wh[d];
    return h ? [{ daysOfWeek: [i], startTime: h.start, endTime: h.end }] : [];
  });
}

export interface CalendarViewProps {
  view: Exclude<RosterView, 'board'>;
  /** The anchor date 'YYYY-MM-DD' (branch-local). */
  date: string;
  timeZone: string;
  today: string;
  /** The bookings of the technicians shown. */
  bookings: Booking[];
  techById: Map<string, Technician>;
  /** The one technician shown, if only one is. */
  focusTech: Technician | undefined;
  onOpen: (b: Booking) => void;
  /** A drag or resize; `revert` puts the event back when the server refuses. */
  onMove: (kind: 'move' | 'resize', b: Booking, times: { startAt: string; endAt: string }, revert: () => void) => void;
  /** A job from the unplaced work dropped at a wall-clock time (a Date whose UTC fields are local). */
  onDropWork: (workOrderId: string, wall: Date, allDay: boolean) => void;
}

export default function CalendarView({
  view,
  date,
  timeZone: tz,
  today,
  bookings,
  techById,
  focusTech,
  onOpen,
  onMove,
  onDropWork,
}: CalendarViewProps) {
  const cal = useRef<FullCalendar>(null);
  const type = fcView[view];

  // Follow the page's view and date. Deferred to a task: FullCalendar re-renders synchronously, which
  // React does not allow from inside an effect.
  useEffect(() => {
    const t = window.setTimeout(() => cal.current?.getApi().changeView(type, date), 0);
    return () => window.clearTimeout(t);
  }, [type, date]);

  const events = useMemo<EventInput[]>(
    () =>
      bookings.map((b) => {
        const colour = colourOf(techById.get(b.techId));
        const movable = b.workOrder.state === 'booked' && !b.fixed;
        return {
          id: b.id,
          start: toWallClock(b.startAt, tz),
          end: toWallClock(b.endAt, tz),
          backgroundColor: colour,
          borderColor: colour,
          textColor: '#ffffff',
          startEditable: movable,
          durationEditable: movable,
          extendedProps: { booking: b },
        };
      }),
    [bookings, techById, tz],
  );

  const save = (kind: 'move' | 'resize', info: EventDropArg | EventResizeDoneArg) => {
    const b = info.event.extendedProps.booking as Booking;
    onMove(kind, b, movedTimes(kind, b, info.event.start!, info.event.end, tz), info.revert);
  };

  const renderEvent = (arg: EventContentArg) => {
    const b = arg.event.extendedProps.booking as Booking | undefined;
    // The mirror of a job being dragged in from the queue has no booking yet.
    if (!b) return <div className="truncate px-1 text-xs text-white">{arg.event.title}</div>;
    return (
      <EventBody
        booking={b}
        tech={techById.get(b.techId)}
        showTech={!focusTech}
        timeZone={tz}
        today={today}
        compact={arg.view.type === 'dayGridMonth' || (arg.view.type === 'timeGridWeek' && !focusTech)}
      />
    );
  };

  // Several technicians in one week grid: at most two events side by side, the rest behind "+N more",
  // so no event shrinks to a sliver. One technician, or one day, keeps every event in its column.
  const crowded = type === 'timeGridWeek' && !focusTech;

  return (
    <div className="roster-calendar coilpath-calendar overflow-x-auto">
      <div className={type === 'timeGridDay' ? '' : 'min-w-[640px]'}>
        <FullCalendar
          // FullCalendar keeps a stacking limit once set; a fresh calendar when it changes.
          key={crowded ? 'stacked' : 'every-event'}
          ref={cal}
          plugins={[timeGridPlugin, dayGridPlugin, interactionPlugin]}
          initialView={type}
          initialDate={date}
          timeZone="UTC"
          now={() => toWallClock(appNowMs(), tz)}
          headerToolbar={false}
          // A month cell is named by its date link alone, which hides the bookings inside it from its
          // name; without the label the cell is named by its content (date and bookings).
          dayCellDidMount={(arg) => arg.el.removeAttribute('aria-labelledby')}
          firstDay={1}
          height={type === 'dayGridMonth' ? 'auto' : 720}
          allDaySlot={false}
          slotMinTime="00:00:00"
          slotMaxTime="24:00:00"
          scrollTime="06:30:00"
          slotDuration="00:30:00"
          snapDuration="00:15:00"
          slotLabelFormat={{ hour: '2-digit', minute: '2-digit', hour12: false }}
          eventTimeFormat={{ hour: '2-digit', minute: '2-digit', hour12: false }}
          dayHeaderFormat={type === 'dayGridMonth' ? { weekday: 'short' } : { weekday: 'short', day: 'numeric', month: 'short' }}
          nowIndicator
          slotEventOverlap={false}
          eventMaxStack={crowded ? 1 : undefined}
          editable
          droppable
          eventInteractive
          eventDisplay="block"
          dayMaxEvents={type === 'dayGridMonth' ? 4 : false}
          // The "+N more" link opens a popover: it acts as a button, which its aria-expanded needs.
          moreLinkDidMount={(arg) => arg.el.setAttribute('role', 'button')}
          businessHours={businessHoursOf(focusTech)}
          events={events}
          eventContent={renderEvent}
          eventDidMount={(arg) => {
            const b = arg.event.extendedProps.booking as Booking | undefined;
            if (!b) return;
            arg.el.setAttribute(
              'aria-label',
              `${bookingSummary(b, techById.get(b.techId), tz)}, ${b.workOrder.siteName}.${eventNameExtras(b)} Open to move, reassign or unbook.`,
            );
            // "Changed by …" inside the event is not part of a name set by aria-label: it is its description.
            arg.el.setAttribute('aria-describedby', changedByNoteId('booking', b.id));
          }}
          eventClick={(arg: EventClickArg) => {
            arg.jsEvent.preventDefault();
            const b = arg.event.extendedProps.booking as Booking | undefined;
            if (b) onOpen(b);
          }}
          eventDrop={(info) => save('move', info)}
          eventResize={(info) => save('resize', info)}
          drop={(info: DropArg) => {
            const id = info.draggedEl.getAttribute('data-wo-id');
            if (id) onDropWork(id, info.date, info.allDay);
          }}
        />
      </div>
    </div>
  );
}
