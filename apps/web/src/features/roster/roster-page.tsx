import { useCallback, useMemo, useRef, useState } from 'react';
import FullCalendar from '@fullcalendar/react';
import timeGridPlugin from '@fullcalendar/timegrid';
import dayGridPlugin from '@fullcalendar/daygrid';
import interactionPlugin, { type DropArg, type EventResizeDoneArg } from '@fullcalendar/interaction';
import type { BusinessHoursInput, DatesSetArg, EventClickArg, EventContentArg, EventDropArg, EventInput } from '@fullcalendar/core';
import { ChevronLeft, ChevronRight, Eye, EyeOff, Plus, Scale } from 'lucide-react';
import type { Booking, Technician, WorkOrder } from '@coilpath/contract';
import { weekdays, workOrderLabel } from '@coilpath/contract';
import { useBranch } from '@/app/branch';
import { Button } from '@/components/ui/button';
import { Card, PageHeader } from '@/components/ui/page';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { todayInZone, viewerZoneDiffers, zoneAbbreviation } from '@/lib/format';
import { isOutsideHours, isStale, useBookings, useCreateBooking, useLoad, useTechnicians, useUnplaced, useUpdateBooking } from './api';
import { BookDialog, type BookInitial } from './book-dialog';
import { BookingDialog, type BookingEdit } from './booking-dialog';
import { EvenOutDialog } from './even-out-dialog';
import { LoadGauge } from './load-gauge';
import { bookingSummary, certLabel, colourOf, EventBody, TechSwatch } from './parts';
import { UnplacedQueue } from './unplaced-queue';
import { WorkOrderDialog } from './work-order-dialog';
import { fromWallClock, movedTimes, toWallClock, wallDate, wallFrom } from './zone';

type View = 'timeGridDay' | 'timeGridWeek' | 'dayGridMonth';
const viewNames: Record<View, string> = { timeGridDay: 'Day', timeGridWeek: 'Week', dayGridMonth: 'Month' };
const stepNames: Record<View, string> = { timeGridDay: 'day', timeGridWeek: 'week', dayGridMonth: 'month' };

const addDaysTo = (day: string, n: number) => wallDate(new Date(wallFrom(day).getTime() + n * 86_400_000));
const dayLabel = (day: string) => wallFrom(day).toLocaleDateString('en-US', { weekday: 'short', day: 'numeric', month: 'short', timeZone: 'UTC' });
const mondayOf = (day: string) => addDaysTo(day, -((wallFrom(day).getUTCDay() + 6) % 7));

function businessHoursOf(t: Technician | undefined): BusinessHoursInput {
  if (!t?.workingHours) return false;
  const wh = t.workingHours;
  return weekdays.flatMap((d, i) => {
    const h = wh[d];
    return h ? [{ daysOfWeek: [i], startTime: h.start, endTime: h.end }] : [];
  });
}

export default function RosterPage() {
  const { branchId, branch, timeZone: branchZone } = useBranch();
  const notify = useNotify();
  const cal = useRef<FullCalendar>(null);
  const [view, setView] = useState<View>(() => (typeof window !== 'undefined' && window.matchMedia?.('(max-width: 767px)').matches ? 'timeGridDay' : 'timeGridWeek'));
  const [focus, setFocus] = useState<string>('all');
  const [hidden, setHidden] = useState<Set<string>>(new Set());
  const [range, setRange] = useState<{ start: Date; end: Date; title: string } | null>(null);
  const [bookFor, setBookFor] = useState<{ wo: WorkOrder; initial: BookInitial } | null>(null);
  const [edit, setEdit] = useState<BookingEdit | null>(null);
  const [newOpen, setNewOpen] = useState(false);
  const [evenOpen, setEvenOpen] = useState(false);

  const techsQ = useTechnicians(branchId);
  const tz = techsQ.data?.timeZone ?? branch?.timeZone ?? branchZone;
  const today = todayInZone(tz);
  const techs = useMemo(() => techsQ.data?.technicians ?? [], [techsQ.data]);
  const focusTech = focus === 'all' ? undefined : techs.find((t) => t.id === focus);
  const visible = useMemo(() => (focusTech ? [focusTech] : techs.filter((t) => !hidden.has(t.id))), [focusTech, techs, hidden]);
  const visibleIds = useMemo(() => new Set(visible.map((t) => t.id)), [visible]);

  const fromIso = range ? fromWallClock(range.start, tz).toISOString() : '';
  const toIso = range ? fromWallClock(range.end, tz).toISOString() : '';
  const days = useMemo(() => {
    if (!range) return [];
    const out: string[] = [];
    for (let d = wallDate(range.start); d < wallDate(range.end); d = addDaysTo(d, 1)) out.push(d);
    return out;
  }, [range]);
  const gaugeDays = useMemo(() => {
    if (days.length <= 7) return days;
    const anchor = days.includes(today) ? mondayOf(today) : (days[7] ?? days[0]!);
    return Array.from({ length: 7 }, (_, i) => addDaysTo(anchor, i));
  }, [days, today]);
  const weekStart = days.length ? (days.length > 7 ? gaugeDays[0]! : mondayOf(days[0]!)) : mondayOf(today);

  const bookingsQ = useBookings(branchId, fromIso, toIso);
  const loadQ = useLoad(branchId, gaugeDays[0] ?? '', gaugeDays[gaugeDays.length - 1] ?? '');
  const unplacedQ = useUnplaced(branchId);
  const create = useCreateBooking();
  const update = useUpdateBooking();

  const techById = useMemo(() => new Map(techs.map((t) => [t.id, t])), [techs]);
  const events = useMemo<EventInput[]>(
    () =>
      (bookingsQ.data ?? [])
        .filter((b) => visibleIds.has(b.techId))
        .map((b) => {
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
    [bookingsQ.data, visibleIds, techById, tz],
  );

  const onDatesSet = useCallback((arg: DatesSetArg) => {
    setRange((r) => (r && r.start.getTime() === arg.start.getTime() && r.end.getTime() === arg.end.getTime() && r.title === arg.view.title ? r : { start: arg.start, end: arg.end, title: arg.view.title }));
  }, []);

  function changeView(v: View) {
    setView(v);
    cal.current?.getApi().changeView(v);
  }

  const saveMove = (kind: 'move' | 'resize', info: EventDropArg | EventResizeDoneArg) => {
    const b = info.event.extendedProps.booking as Booking;
    const times = movedTimes(kind, b, info.event.start!, info.event.end, tz);
    update.mutate(
      { id: b.id, version: b.version, ...times },
      {
        onSuccess: (nb) => notify(`${kind === 'move' ? 'Moved' : 'Changed'}: ${bookingSummary(nb, techById.get(nb.techId), tz)}.`),
        onError: (e) => {
          info.revert();
          if (isStale(e)) notify('Moved by someone else. The calendar now shows this booking as it is; make your change again if it is still needed.', 'alarm');
          else if (isOutsideHours(e)) setEdit({ booking: b, attempt: { techId: b.techId, ...times }, error: errorMessage(e), outsideHours: true });
          else notify(errorMessage(e), 'alarm');
        },
      },
    );
  };

  const onDrop = (info: DropArg) => {
    const id = info.draggedEl.getAttribute('data-wo-id');
    const wo = unplacedQ.data?.find((w) => w.id === id);
    if (!wo) return;
    const date = wallDate(info.date);
    const time = info.allDay ? (focusTech?.workingHours?.[weekdays[info.date.getUTCDay()]!]?.start ?? '08:00') : info.date.toISOString().slice(11, 16);
    if (focusTech && !info.allDay) {
      create.mutate(
        { workOrderId: wo.id, techId: focusTech.id, startAt: fromWallClock(info.date, tz).toISOString() },
        {
          onSuccess: (b) => notify(`Booked ${bookingSummary(b, focusTech, tz)}.`),
          onError: (e) => setBookFor({ wo, initial: { techId: focusTech.id, date, time, error: errorMessage(e), outsideHours: isOutsideHours(e) } }),
        },
      );
    } else {
      setBookFor({ wo, initial: { techId: focusTech?.id, date, time } });
    }
  };

  const openBook = useCallback(
    (wo: WorkOrder) => {
      // Late in the branch's day, suggest tomorrow: today's working hours are mostly gone.
      const lateToday = Number(toWallClock(Date.now(), tz).toISOString().slice(11, 13)) >= 14;
      const soonest = lateToday ? addDaysTo(today, 1) : today;
      const date = range && days.length <= 7 && !days.includes(today) && days[0]! > today ? days[0]! : soonest;
      setBookFor({ wo, initial: { techId: focusTech?.id, date, time: '08:00' } });
    },
    [range, days, today, focusTech, tz],
  );

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

  if (!branchId) {
    return (
      <>
        <PageHeader title="Roster" subtitle="Technician calendars, unplaced work and load for one branch." />
        <EmptyState title="Choose a branch">Pick a branch in the switcher at the top; the Roster shows one branch’s technicians at a time.</EmptyState>
      </>
    );
  }

  const zoneNote = viewerZoneDiffers(tz) ? ` · times in ${tz} (${zoneAbbreviation(range ? fromIso || new Date() : new Date(), tz)})` : ` · ${tz}`;
  const skills = [...new Set(techs.flatMap((t) => t.skills))].sort();

  return (
    <>
      <PageHeader
        title="Roster"
        subtitle={
          <>
            Book, move and even out work on {branch?.name ?? 'the branch'}’s technician calendars · {range?.title ?? '…'}
            {zoneNote}
          </>
        }
        actions={
          <>
            <Button variant="secondary" onClick={() => setEvenOpen(true)} disabled={!techs.length}>
              <Scale className="size-4" aria-hidden="true" /> Even out this week
            </Button>
            <Button onClick={() => setNewOpen(true)}>
              <Plus className="size-4" aria-hidden="true" /> New work order
            </Button>
          </>
        }
      />

      {techsQ.isError ? (
        <ErrorState error={techsQ.error} onRetry={() => techsQ.refetch()} />
      ) : techsQ.isPending ? (
        <LoadingState label="Loading technicians…" />
      ) : (
        <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_400px]">
          <div className="flex min-w-0 flex-col gap-4">
            <Card>
              <div className="mb-3 flex flex-wrap items-center gap-2">
                <div className="flex items-center gap-1">
                  <Button variant="secondary" size="sm" aria-label={`Previous ${stepNames[view]}`} onClick={() => cal.current?.getApi().prev()}>
                    <ChevronLeft className="size-4" aria-hidden="true" />
                  </Button>
                  <Button variant="secondary" size="sm" onClick={() => cal.current?.getApi().gotoDate(today)}>
                    Today
                  </Button>
                  <Button variant="secondary" size="sm" aria-label={`Next ${stepNames[view]}`} onClick={() => cal.current?.getApi().next()}>
                    <ChevronRight className="size-4" aria-hidden="true" />
                  </Button>
                </div>
                <h2 className="min-w-40 flex-1 text-base font-semibold" aria-live="polite">
                  {range?.title}
                </h2>
                <div role="group" aria-label="Calendar view" className="flex rounded-md border border-slate-line">
                  {(Object.keys(viewNames) as View[]).map((v) => (
                    <button
                      key={v}
                      type="button"
                      aria-pressed={view === v}
                      onClick={() => changeView(v)}
                      className={`min-h-9 px-3 text-sm first:rounded-l-md last:rounded-r-md ${view === v ? 'bg-ink text-white' : 'bg-white hover:bg-slate-faint'}`}
                    >
                      {viewNames[v]}
                    </button>
                  ))}
                </div>
                <label className="flex items-center gap-2 text-sm">
                  <span className="text-slate">Show</span>
                  <select className="min-h-9 rounded-md border border-slate-line bg-white px-2 text-sm" value={focus} onChange={(e) => setFocus(e.target.value)}>
                    <option value="all">All technicians</option>
                    {techs.map((t) => (
                      <option key={t.id} value={t.id}>
                        Only {t.name}
                      </option>
                    ))}
                  </select>
                </label>
              </div>
              {!focusTech && techs.length > 0 && (
                <ul className="mb-3 flex flex-wrap gap-1.5" aria-label="Technicians shown on the calendar">
                  {techs.map((t) => {
                    const shown = !hidden.has(t.id);
                    return (
                      <li key={t.id}>
                        <button
                          type="button"
                          aria-pressed={shown}
                          title={`${certLabel(t)}${t.skills.length ? ` · ${t.skills.join(', ')}` : ''}`}
                          onClick={() =>
                            setHidden((h) => {
                              const n = new Set(h);
                              if (n.has(t.id)) n.delete(t.id);
                              else n.add(t.id);
                              return n;
                            })
                          }
                          className={`inline-flex min-h-9 items-center gap-1.5 rounded-full border px-3 text-sm ${shown ? 'border-slate-line bg-white' : 'border-dashed border-slate-line bg-frost text-slate line-through'}`}
                        >
                          <TechSwatch tech={t} />
                          {t.name}
                          {shown ? <Eye className="size-3.5" aria-hidden="true" /> : <EyeOff className="size-3.5" aria-hidden="true" />}
                          <span className="sr-only">{shown ? '(shown)' : '(hidden)'}</span>
                        </button>
                      </li>
                    );
                  })}
                </ul>
              )}
              {techs.length === 0 && (
                <p className="mb-3 text-sm text-slate">This branch has no active technicians yet. The owner adds them on the Team screen.</p>
              )}
              {focusTech && <p className="mb-2 text-sm text-slate">Drop a job from the unplaced work onto {focusTech.name}’s calendar to book it there. Shaded: outside working hours.</p>}
              {!focusTech && <p className="mb-2 text-sm text-slate">Drop a job onto a time to choose the technician, or show one technician to book straight onto their calendar.</p>}
              {bookingsQ.isError && <ErrorState error={bookingsQ.error} onRetry={() => bookingsQ.refetch()} title="The bookings could not be loaded" />}
              <div className="roster-calendar coilpath-calendar overflow-x-auto" aria-busy={bookingsQ.isFetching || undefined}>
                <div className={view === 'timeGridDay' ? '' : 'min-w-[640px]'}>
                  <FullCalendar
                    ref={cal}
                    plugins={[timeGridPlugin, dayGridPlugin, interactionPlugin]}
                    initialView={view}
                    initialDate={today}
                    timeZone="UTC"
                    now={() => toWallClock(Date.now(), tz)}
                    headerToolbar={false}
                    // A month cell is named by its date link alone, which hides the bookings inside it from its
                    // name; without the label the cell is named by its content (date and bookings).
                    dayCellDidMount={(arg) => arg.el.removeAttribute('aria-labelledby')}
                    firstDay={1}
                    height={view === 'dayGridMonth' ? 'auto' : 720}
                    allDaySlot={false}
                    slotMinTime="00:00:00"
                    slotMaxTime="24:00:00"
                    scrollTime="06:30:00"
                    slotDuration="00:30:00"
                    snapDuration="00:15:00"
                    slotLabelFormat={{ hour: '2-digit', minute: '2-digit', hour12: false }}
                    eventTimeFormat={{ hour: '2-digit', minute: '2-digit', hour12: false }}
                    dayHeaderFormat={view === 'dayGridMonth' ? { weekday: 'short' } : { weekday: 'short', day: 'numeric', month: 'short' }}
                    nowIndicator
                    slotEventOverlap={false}
                    editable
                    droppable
                    eventInteractive
                    eventDisplay="block"
                    dayMaxEvents={view === 'dayGridMonth' ? 4 : false}
                    // The "+N more" link opens a popover: it acts as a button, which its aria-expanded needs.
                    moreLinkDidMount={(arg) => arg.el.setAttribute('role', 'button')}
                    businessHours={businessHoursOf(focusTech)}
                    events={events}
                    eventContent={renderEvent}
                    eventDidMount={(arg) => {
                      const b = arg.event.extendedProps.booking as Booking | undefined;
                      if (!b) return;
                      arg.el.setAttribute('aria-label', `${bookingSummary(b, techById.get(b.techId), tz)}, ${b.workOrder.siteName}. Open to move, reassign or unbook.`);
                    }}
                    eventClick={(arg: EventClickArg) => {
                      arg.jsEvent.preventDefault();
                      const b = arg.event.extendedProps.booking as Booking | undefined;
                      if (b) setEdit({ booking: b });
                    }}
                    eventDrop={(info) => saveMove('move', info)}
                    eventResize={(info) => saveMove('resize', info)}
                    drop={onDrop}
                    datesSet={onDatesSet}
                  />
                </div>
              </div>
            </Card>

            <Card title={`Load, ${gaugeDays.map(dayLabel).filter((_, i, a) => i === 0 || i === a.length - 1).join(' to ')}`}>
              <p className="mb-2 text-sm text-slate">Booked time against each technician’s working hours. Over capacity shows in red with the word “Over”.</p>
              {loadQ.isError ? (
                <ErrorState error={loadQ.error} onRetry={() => loadQ.refetch()} />
              ) : loadQ.data ? (
                visible.length ? (
                  <LoadGauge techs={visible} days={gaugeDays} load={loadQ.data} />
                ) : (
                  <p className="text-sm text-slate">Show at least one technician to see their load.</p>
                )
              ) : (
                <LoadingState label="Loading load…" />
              )}
            </Card>
          </div>

          <aside aria-labelledby="queue-heading" className="min-w-0">
            <Card>
              <div className="mb-2 flex items-center justify-between gap-2">
                <h2 id="queue-heading" className="text-base font-semibold">
                  Unplaced work
                </h2>
                <Button size="sm" variant="secondary" onClick={() => setNewOpen(true)}>
                  <Plus className="size-4" aria-hidden="true" /> New
                </Button>
              </div>
              {unplacedQ.isPending ? (
                <LoadingState label="Loading unplaced work…" />
              ) : unplacedQ.isError ? (
                <ErrorState error={unplacedQ.error} onRetry={() => unplacedQ.refetch()} />
              ) : (
                <UnplacedQueue workOrders={unplacedQ.data} timeZone={tz} today={today} onBook={openBook} />
              )}
            </Card>
          </aside>
        </div>
      )}

      <BookDialog workOrder={bookFor?.wo ?? null} initial={bookFor?.initial ?? { date: today, time: '08:00' }} techs={techs} timeZone={tz} onClose={() => setBookFor(null)} />
      <BookingDialog edit={edit} techs={techs} timeZone={tz} today={today} onClose={() => setEdit(null)} />
      <WorkOrderDialog open={newOpen} branchId={branchId} timeZone={tz} skills={skills} onClose={() => setNewOpen(false)} />
      <EvenOutDialog open={evenOpen} branchId={branchId} week={weekStart} techs={techs} timeZone={tz} onClose={() => setEvenOpen(false)} />
      <span className="sr-only" aria-live="polite">
        {bookFor ? `Booking ${workOrderLabel(bookFor.wo.number)}` : ''}
      </span>
    </>
  );
}
