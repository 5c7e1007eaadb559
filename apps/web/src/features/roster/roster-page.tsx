import { lazy, Suspense, useCallback, useEffect, useMemo, useState, type ReactNode } from 'react';
import { useSearchParams } from 'react-router-dom';
import { ChevronLeft, ChevronRight, Eye, EyeOff, PanelRightClose, PanelRightOpen, Plus, Scale } from 'lucide-react';
import type { Booking, TechnicianDayLoad, WorkOrder } from '@coilpath/contract';
import { weekdays } from '@coilpath/contract/vocabulary';
import { workOrderLabel } from '@coilpath/contract/work-orders';
import { useBranch } from '@/lib/branch';
import { Button } from '@/components/ui/button';
import { Card, PageHeader } from '@/components/ui/page';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { todayInZone, viewerZoneDiffers, zoneAbbreviation } from '@/lib/format';
import { isStale, useBookings, useCreateBooking, useLoad, useTechnicians, useUnplaced, useUpdateBooking } from './api';
import {
  addDays,
  cellKey,
  daysRange,
  dayShort,
  groupBookings,
  mondayOf,
  rosterViews,
  stepDate,
  viewDays,
  viewTitle,
  weekOf,
  type RosterView,
} from './board';
import { TechBoard } from './board-view';
import { BookDialog, type BookInitial } from './book-dialog';
import { BookingDialog, type BookingEdit } from './booking-dialog';
import { EvenOutDialog } from './even-out-dialog';
import { LoadGauge } from './load-gauge';
import { bookingSummary, certLabel, TechSwatch } from './parts';
import { refusedRules } from './rules';
import { UnplacedQueue } from './unplaced-queue';
import { WorkOrderDialog } from './work-order-dialog';
import { fromWallClock, instantToLocal, localToInstant, toWallClock, wallDate } from './zone';
import { appNowMs } from '@/lib/now';

/** FullCalendar loads only when a time grid or the month is shown. */
const CalendarView = lazy(() => import('./calendar-view'));

const viewNames: Record<RosterView, string> = { board: 'Board', day: 'Day', week: 'Week', month: 'Month' };
const viewHints: Record<RosterView, string> = {
  board: 'Technicians by day: load and bookings for the week',
  day: 'One day on the time grid',
  week: 'The week on the time grid',
  month: 'The month',
};
const stepNames: Record<RosterView, string> = { board: 'week', day: 'day', week: 'week', month: 'month' };
const isDate = (s: string | null): s is string => !!s && /^\d{4}-\d{2}-\d{2}$/.test(s) && !Number.isNaN(Date.parse(`${s}T00:00:00Z`));

/** The Roster's view, anchor date and technician live in the URL (`?view=board&date=2026-12-01&tech=…`). */
function useRosterParams(today: string) {
  const [sp, setSp] = useSearchParams();
  const v = sp.get('view');
  const view: RosterView = rosterViews.includes(v as RosterView) ? (v as RosterView) : 'board';
  const d = sp.get('date');
  const date = isDate(d) ? d : today;
  const tech = sp.get('tech') ?? 'all';
  const queueHidden = sp.get('queue') === 'hidden';
  const set = useCallback(
    (patch: { view?: RosterView; date?: string; tech?: string; queue?: 'hidden' | undefined }) =>
      setSp(
        (prev) => {
          const next = new URLSearchParams(prev);
          for (const [k, val] of Object.entries(patch) as [string, string | undefined][]) {
            if (val === undefined || (k === 'tech' && val === 'all')) next.delete(k);
            else next.set(k, val);
          }
          return next;
        },
        { replace: true },
      ),
    [setSp],
  );
  return { view, date, tech, queueHidden, set };
}

export default function RosterPage() {
  const { branchId, branch, timeZone: branchZone } = useBranch();
  const notify = useNotify();
  const [hidden, setHidden] = useState<Set<string>>(new Set());
  const [bookFor, setBookFor] = useState<{ wo: WorkOrder; initial: BookInitial } | null>(null);
  const [edit, setEdit] = useState<BookingEdit | null>(null);
  const [newOpen, setNewOpen] = useState(false);
  const [evenOpen, setEvenOpen] = useState(false);
  const [placing, setPlacing] = useState<WorkOrder | null>(null);

  const techsQ = useTechnicians(branchId);
  const tz = techsQ.data?.timeZone ?? branch?.timeZone ?? branchZone;
  const today = todayInZone(tz);
  const { view, date, tech: focus, queueHidden, set } = useRosterParams(today);
  const techs = useMemo(() => techsQ.data?.technicians ?? [], [techsQ.data]);
  const focusTech = focus === 'all' ? undefined : techs.find((t) => t.id === focus);
  const visible = useMemo(() => (focusTech ? [focusTech] : techs.filter((t) => !hidden.has(t.id))), [focusTech, techs, hidden]);
  const visibleIds = useMemo(() => new Set(visible.map((t) => t.id)), [visible]);
  const techById = useMemo(() => new Map(techs.map((t) => [t.id, t])), [techs]);

  const days = useMemo(() => viewDays(view, date), [view, date]);
  const range = useMemo(() => daysRange(days, tz), [days, tz]);
  const gaugeDays = useMemo(() => {
    if (days.length <= 7) return days;
    return days.includes(today) ? weekOf(today) : weekOf(days[7]!);
  }, [days, today]);
  const weekStart = view === 'month' ? gaugeDays[0]! : mondayOf(date);

  const bookingsQ = useBookings(branchId, range.from, range.to);
  const loadQ = useLoad(branchId, gaugeDays[0]!, gaugeDays[gaugeDays.length - 1]!);
  const unplacedQ = useUnplaced(branchId);
  const create = useCreateBooking();
  const update = useUpdateBooking();

  const shown = useMemo(() => (bookingsQ.data ?? []).filter((b) => visibleIds.has(b.techId)), [bookingsQ.data, visibleIds]);
  const cells = useMemo(() => (view === 'board' ? groupBookings(shown, tz, days) : new Map()), [view, shown, tz, days]);
  const loadByCell = useMemo(
    () => (loadQ.data ? new Map<string, TechnicianDayLoad>(loadQ.data.map((l) => [cellKey(l.techId, l.day), l])) : undefined),
    [loadQ.data],
  );

  // Escape puts a picked job back.
  useEffect(() => {
    if (!placing) return;
    const onKey = (e: KeyboardEvent) => {
      if (e.key === 'Escape') setPlacing(null);
    };
    document.addEventListener('keydown', onKey);
    return () => document.removeEventListener('keydown', onKey);
  }, [placing]);
  // Leaving the board puts a picked job back.
  const [placingView, setPlacingView] = useState(view);
  if (placingView !== view) {
    setPlacingView(view);
    if (view !== 'board') setPlacing(null);
  }

  /**
   * Saves new times (a drag on the calendar or the board); a refusal reverts and says why. A move on
   * the board keeps the local start time, so a refusal there (overlap, hours…) opens the booking with
   * the attempted technician and day to pick another time.
   */
  const saveTimes = (
    b: Booking,
    next: { techId?: string; startAt: string; endAt: string },
    verb: string,
    opts: { revert?: () => void; adjustOnRefusal?: boolean } = {},
  ) => {
    update.mutate(
      { id: b.id, version: b.version, ...next },
      {
        onSuccess: (nb) => notify(`${verb}: ${bookingSummary(nb, techById.get(nb.techId), tz)}.`),
        onError: (e) => {
          opts.revert?.();
          const attempt = { techId: next.techId ?? b.techId, startAt: next.startAt, endAt: next.endAt };
          const rules = refusedRules(e);
          if (isStale(e))
            notify(
              'Moved by someone else. The Roster now shows this booking as it is; make your change again if it is still needed.',
              'alarm',
            );
          // A booking rule: the booking opens at the times tried, saying which rule, to book against it with a reason.
          else if (rules.length) setEdit({ booking: b, attempt, error: errorMessage(e), refusedRules: rules });
          else if (opts.adjustOnRefusal) setEdit({ booking: b, attempt, error: errorMessage(e) });
          else notify(errorMessage(e), 'alarm');
        },
      },
    );
  };

  /** A chip dropped on another technician's or day's cell: same local start time, same length. */
  const moveTo = (b: Booking, techId: string, day: string) => {
    const start = instantToLocal(b.startAt, tz);
    if (techId === b.techId && day === start.date) return;
    const startAt = localToInstant(day, start.time, tz);
    const endAt = new Date(Date.parse(startAt) + (Date.parse(b.endAt) - Date.parse(b.startAt))).toISOString();
    saveTimes(b, { techId, startAt, endAt }, techId === b.techId ? 'Moved' : 'Reassigned', { adjustOnRefusal: true });
  };

  /** The booking form for a job on a technician's day (board cell): the server proposes the start. */
  const place = (workOrderId: string, techId: string, day: string) => {
    setPlacing(null);
    const wo = unplacedQ.data?.find((w) => w.id === workOrderId);
    if (!wo) {
      notify('That job is no longer waiting in the unplaced work.', 'alarm');
      return;
    }
    const start = techById.get(techId)?.workingHours?.[weekdays[new Date(`${day}T12:00:00Z`).getUTCDay()]!]?.start ?? '08:00';
    setBookFor({ wo, initial: { techId, date: day, time: start, proposeTime: true } });
  };

  const dropWork = (workOrderId: string, wall: Date, allDay: boolean) => {
    const wo = unplacedQ.data?.find((w) => w.id === workOrderId);
    if (!wo) return;
    const day = wallDate(wall);
    const time = allDay ? (focusTech?.workingHours?.[weekdays[wall.getUTCDay()]!]?.start ?? '08:00') : wall.toISOString().slice(11, 16);
    if (focusTech && !allDay) {
      create.mutate(
        { workOrderId: wo.id, techId: focusTech.id, startAt: fromWallClock(wall, tz).toISOString() },
        {
          onSuccess: (b) => notify(`Booked ${bookingSummary(b, focusTech, tz)}.`),
          onError: (e) =>
            setBookFor({ wo, initial: { techId: focusTech.id, date: day, time, error: errorMessage(e), refusedRules: refusedRules(e) } }),
        },
      );
    } else {
      setBookFor({ wo, initial: { techId: focusTech?.id, date: day, time } });
    }
  };

  const openBook = useCallback(
    (wo: WorkOrder) => {
      setPlacing(null);
      // Late in the branch's day, suggest tomorrow: today's working hours are mostly gone.
      const lateToday = Number(toWallClock(appNowMs(), tz).toISOString().slice(11, 13)) >= 14;
      const soonest = lateToday ? addDays(today, 1) : today;
      const start = days.length <= 7 && !days.includes(today) && days[0]! > today ? days[0]! : soonest;
      setBookFor({ wo, initial: { techId: focusTech?.id, date: start, time: '08:00' } });
    },
    [days, today, focusTech, tz],
  );

  if (!branchId) {
    return (
      <>
        <PageHeader title="Roster" subtitle="Technician calendars, unplaced work and load for one branch." />
        <EmptyState title="Choose a branch">
          Pick a branch in the switcher at the top; the Roster shows one branch’s technicians at a time.
        </EmptyState>
      </>
    );
  }

  const title = viewTitle(view, date);
  const zoneNote = viewerZoneDiffers(tz) ? ` · times in ${tz} (${zoneAbbreviation(range.from, tz)})` : ` · ${tz}`;
  const skills = [...new Set(techs.flatMap((t) => t.skills))].sort();
  const busy = bookingsQ.isFetching || loadQ.isFetching;
  const crowdedWeek = view === 'week' && !focusTech && visible.length > 2;

  let board: ReactNode;
  if (view === 'board') {
    if (techs.length === 0)
      board = null; // said above the board
    else if (visible.length === 0)
      board = (
        <EmptyState title="Every technician is hidden">Show at least one technician with the buttons above to see their week.</EmptyState>
      );
    else if (bookingsQ.isPending) board = <LoadingState label="Loading the week’s bookings…" />;
    else if (!bookingsQ.data)
      board = null; // the error above says why
    else
      board = (
        <>
          {shown.length === 0 && (
            <p className="mb-2 rounded-md border border-dashed border-slate-line p-3 text-sm text-slate">
              Nothing is booked for {focusTech ? focusTech.name : 'these technicians'} from {dayShort(days[0]!)} to {dayShort(days[6]!)}.
              Drag a job from the unplaced work onto a technician’s day, or use its Book… button.
            </p>
          )}
          {loadQ.isError && (
            <div className="mb-2">
              <ErrorState error={loadQ.error} onRetry={() => loadQ.refetch()} title="The load could not be loaded" />
            </div>
          )}
          <TechBoard
            techs={visible}
            days={days}
            day={date}
            today={today}
            timeZone={tz}
            cells={cells}
            load={loadByCell}
            placing={placing}
            onOpen={(b) => setEdit({ booking: b })}
            onOpenDay={(techId, day) => set({ view: 'day', date: day, tech: techId })}
            onPlace={place}
            onMoveTo={moveTo}
            onPickDay={(d) => set({ date: d })}
            onCancelPlacing={() => setPlacing(null)}
          />
        </>
      );
  }

  return (
    <>
      <PageHeader
        title="Roster"
        subtitle={
          <>
            Book, move and even out work on {branch?.name ?? 'the branch'}’s technician calendars · {title}
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
        <div className={`grid gap-4 ${queueHidden ? 'xl:grid-cols-[minmax(0,1fr)_auto]' : 'xl:grid-cols-[minmax(0,1fr)_300px]'}`}>
          <div className="flex min-w-0 flex-col gap-4">
            <Card>
              <div className="mb-3 flex flex-wrap items-center gap-2">
                <div className="flex items-center gap-1">
                  <Button
                    variant="secondary"
                    size="sm"
                    aria-label={`Previous ${stepNames[view]}`}
                    onClick={() => set({ date: stepDate(view, date, -1) })}
                  >
                    <ChevronLeft className="size-4" aria-hidden="true" />
                  </Button>
                  <Button variant="secondary" size="sm" onClick={() => set({ date: today })}>
                    Today
                  </Button>
                  <Button
                    variant="secondary"
                    size="sm"
                    aria-label={`Next ${stepNames[view]}`}
                    onClick={() => set({ date: stepDate(view, date, 1) })}
                  >
                    <ChevronRight className="size-4" aria-hidden="true" />
                  </Button>
                </div>
                <h2 className="min-w-40 flex-1 text-base font-semibold" aria-live="polite">
                  {title}
                </h2>
                <div role="group" aria-label="Roster view" className="flex rounded-md border border-slate-line">
                  {rosterViews.map((v) => (
                    <button
                      key={v}
                      type="button"
                      aria-pressed={view === v}
                      title={viewHints[v]}
                      onClick={() => set({ view: v })}
                      className={`min-h-9 px-3 text-sm first:rounded-l-md last:rounded-r-md ${view === v ? 'bg-ink text-white' : 'bg-white hover:bg-slate-faint'}`}
                    >
                      {viewNames[v]}
                    </button>
                  ))}
                </div>
                <label className="flex items-center gap-2 text-sm">
                  <span className="text-slate">Show</span>
                  <select
                    className="min-h-9 rounded-md border border-slate-line bg-white px-2 text-sm"
                    value={focusTech?.id ?? 'all'}
                    onChange={(e) => set({ tech: e.target.value })}
                  >
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
                // On a phone the "Show" list picks one technician; the toggles would push the board off the screen.
                <ul className="mb-3 hidden flex-wrap gap-1.5 md:flex" aria-label="Technicians shown">
                  {techs.map((t) => {
                    const on = !hidden.has(t.id);
                    return (
                      <li key={t.id}>
                        <button
                          type="button"
                          aria-pressed={on}
                          title={`${certLabel(t)}${t.skills.length ? ` · ${t.skills.join(', ')}` : ''}`}
                          onClick={() =>
                            setHidden((h) => {
                              const n = new Set(h);
                              if (n.has(t.id)) n.delete(t.id);
                              else n.add(t.id);
                              return n;
                            })
                          }
                          className={`inline-flex min-h-9 items-center gap-1.5 rounded-full border px-3 text-sm ${on ? 'border-slate-line bg-white' : 'border-dashed border-slate-line bg-frost text-slate line-through'}`}
                        >
                          <TechSwatch tech={t} />
                          {t.name}
                          {on ? <Eye className="size-3.5" aria-hidden="true" /> : <EyeOff className="size-3.5" aria-hidden="true" />}
                          <span className="sr-only">{on ? '(shown)' : '(hidden)'}</span>
                        </button>
                      </li>
                    );
                  })}
                </ul>
              )}
              {techs.length === 0 && (
                <EmptyState title="No technicians in this branch yet">
                  The board shows one row per active technician. The owner adds technicians and their working hours on the Team screen.
                </EmptyState>
              )}
              {view !== 'board' && focusTech && (
                <p className="mb-2 text-sm text-slate">
                  Drop a job from the unplaced work onto {focusTech.name}’s calendar to book it there. Shaded: outside working hours.
                </p>
              )}
              {view !== 'board' && !focusTech && (
                <p className="mb-2 text-sm text-slate">
                  Drop a job onto a time to choose the technician, or show one technician to book straight onto their calendar.
                </p>
              )}
              {crowdedWeek && (
                <p className="mb-2 rounded-md border border-slate-line bg-frost px-3 py-2 text-sm" role="note">
                  {visible.length} technicians share each day here, so busy hours show two bookings and a “+ more” link. For every booking
                  at a glance use the{' '}
                  <button type="button" className="font-medium text-coolant underline" onClick={() => set({ view: 'board' })}>
                    Board
                  </button>
                  , or show one technician.
                </p>
              )}
              {bookingsQ.isError && (
                <ErrorState error={bookingsQ.error} onRetry={() => bookingsQ.refetch()} title="The bookings could not be loaded" />
              )}
              <div aria-busy={busy || undefined}>
                {view === 'board' ? (
                  board
                ) : (
                  <Suspense fallback={<LoadingState label="Loading the calendar…" />}>
                    <CalendarView
                      view={view}
                      date={date}
                      timeZone={tz}
                      today={today}
                      bookings={shown}
                      techById={techById}
                      focusTech={focusTech}
                      onOpen={(b) => setEdit({ booking: b })}
                      onMove={(kind, b, times, revert) => saveTimes(b, times, kind === 'move' ? 'Moved' : 'Changed', { revert })}
                      onDropWork={dropWork}
                    />
                  </Suspense>
                )}
              </div>
            </Card>

            {view !== 'board' && (
              <Card
                title={`Load, ${gaugeDays.length === 1 ? dayShort(gaugeDays[0]!) : `${dayShort(gaugeDays[0]!)} to ${dayShort(gaugeDays[gaugeDays.length - 1]!)}`}`}
              >
                <p className="mb-2 text-sm text-slate">
                  Booked time against each technician’s working hours. Over capacity shows in red with the word “Over”.
                </p>
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
            )}
          </div>

          {queueHidden ? (
            <aside aria-label="Unplaced work" className="min-w-0">
              <button
                type="button"
                onClick={() => set({ queue: undefined })}
                className="flex w-full items-center gap-2 rounded-lg border border-slate-line bg-white px-3 py-2 text-sm font-medium hover:bg-slate-faint xl:min-h-72 xl:w-11 xl:flex-col xl:px-2 xl:py-3"
              >
                <PanelRightOpen className="size-4 shrink-0" aria-hidden="true" />
                <span className="xl:[writing-mode:vertical-rl]">
                  Show unplaced work{unplacedQ.data ? ` (${unplacedQ.data.length} waiting)` : ''}
                </span>
              </button>
            </aside>
          ) : (
            <aside aria-labelledby="queue-heading" className="min-w-0">
              <Card>
                <div className="mb-2 flex items-center justify-between gap-2">
                  <h2 id="queue-heading" className="text-base font-semibold">
                    Unplaced work
                  </h2>
                  <div className="flex items-center gap-1">
                    <Button size="sm" variant="secondary" onClick={() => setNewOpen(true)}>
                      <Plus className="size-4" aria-hidden="true" /> New
                    </Button>
                    <Button
                      size="sm"
                      variant="ghost"
                      aria-label="Hide the unplaced work"
                      title="Hide the unplaced work: more room for the board"
                      onClick={() => {
                        setPlacing(null);
                        set({ queue: 'hidden' });
                      }}
                    >
                      <PanelRightClose className="size-4" aria-hidden="true" />
                    </Button>
                  </div>
                </div>
                {unplacedQ.isPending ? (
                  <LoadingState label="Loading unplaced work…" />
                ) : unplacedQ.isError ? (
                  <ErrorState error={unplacedQ.error} onRetry={() => unplacedQ.refetch()} />
                ) : (
                  <UnplacedQueue
                    workOrders={unplacedQ.data}
                    timeZone={tz}
                    today={today}
                    onBook={openBook}
                    mode={view === 'board' ? 'board' : 'calendar'}
                    picked={placing?.id ?? null}
                    onPick={setPlacing}
                  />
                )}
              </Card>
            </aside>
          )}
        </div>
      )}

      <BookDialog
        workOrder={bookFor?.wo ?? null}
        initial={bookFor?.initial ?? { date: today, time: '08:00' }}
        techs={techs}
        timeZone={tz}
        onClose={() => setBookFor(null)}
      />
      <BookingDialog edit={edit} techs={techs} timeZone={tz} today={today} onClose={() => setEdit(null)} />
      <WorkOrderDialog open={newOpen} branchId={branchId} timeZone={tz} skills={skills} onClose={() => setNewOpen(false)} />
      <EvenOutDialog open={evenOpen} branchId={branchId} week={weekStart} techs={techs} timeZone={tz} onClose={() => setEvenOpen(false)} />
      <span className="sr-only" aria-live="polite">
        {bookFor
          ? `Booking ${workOrderLabel(bookFor.wo.number)}`
          : placing
            ? `Picked ${workOrderLabel(placing.number)}: choose a technician’s day on the board`
            : ''}
      </span>
    </>
  );
}
