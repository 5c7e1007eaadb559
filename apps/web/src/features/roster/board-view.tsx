/**
 * The technician board: one row per technician, one column per day of the week (branch-local), each
 * cell the technician's load that day and their bookings as chips in start order. On a narrow
 * screen the same cells show one day at a time, technicians stacked, with a day pager.
 *
 * Drag a job from the unplaced work (or pick it with its handle, then choose a cell) to book it for
 * a technician and day; drag a chip to another cell to move it there at the same local time. Every
 * chip opens the booking's details (move, reassign, unbook). Arrow keys move between cells.
 */
import {
  useEffect,
  useEffectEvent,
  useLayoutEffect,
  useMemo,
  useRef,
  useState,
  type DragEvent,
  type KeyboardEvent,
  type ReactNode,
} from 'react';
import { AlertTriangle, CheckCircle2, ChevronLeft, ChevronRight, Droplet, Lock, Moon, Plus, ShieldAlert, Siren, X } from 'lucide-react';
import type { Booking, Technician, TechnicianDayLoad, WorkOrder } from '@coilpath/contract';
import { changedByLabel } from '@coilpath/contract/events';
import { priorityLabels, workOrderKindLabels, workOrderStateLabels } from '@coilpath/contract/vocabulary';
import { workOrderLabel } from '@coilpath/contract/work-orders';
import { Button } from '@/components/ui/button';
import {
  addDays,
  cellKey,
  DRAG_BOOKING,
  DRAG_WORK_ORDER,
  cellLabel,
  dayLong,
  dayShort,
  entryTime,
  gaugeText,
  loadState,
  offDayWord,
  monthName,
  tightMinutes,
  weekdayName,
  type BoardEntry,
  type LoadState,
} from './board';
import { formatMinutes } from '@/lib/format';
import { useChangedBy } from '@/lib/live-events';
import { colourOf, leakDeadline, TechSwatch } from './parts';
import { overrideSummary } from './rules';

/** Below this width (px) the board shows one day at a time. */
const PAGER_BELOW = 720;

export interface TechBoardProps {
  techs: Technician[];
  /** Monday to Sunday. */
  days: string[];
  /** The day the pager shows on a narrow screen (one of `days`). */
  day: string;
  today: string;
  timeZone: string;
  cells: Map<string, BoardEntry[]>;
  load: Map<string, TechnicianDayLoad> | undefined;
  /** A job picked from the unplaced work, waiting for a cell. */
  placing: WorkOrder | null;
  onOpen: (b: Booking) => void;
  /** Open a technician's day on the time grid. */
  onOpenDay: (techId: string, day: string) => void;
  /** Book a job (by id) for a technician and day: opens the booking form. */
  onPlace: (workOrderId: string, techId: string, day: string) => void;
  /** A chip dropped on another cell. */
  onMoveTo: (b: Booking, techId: string, day: string) => void;
  onPickDay: (day: string) => void;
  onCancelPlacing: () => void;
}

function useNarrow(ref: React.RefObject<HTMLElement | null>) {
  const [narrow, setNarrow] = useState(() => typeof window !== 'undefined' && window.innerWidth < 1024);
  useLayoutEffect(() => {
    const el = ref.current;
    if (!el) return;
    const measure = () => setNarrow(el.getBoundingClientRect().width < PAGER_BELOW);
    measure();
    const ro = new ResizeObserver(measure);
    ro.observe(el);
    return () => ro.disconnect();
  }, [ref]);
  return narrow;
}

const stateIcon: Record<LoadState, ReactNode> = {
  off: <Moon className="size-3.5 shrink-0 text-slate" aria-hidden="true" />,
  ok: <CheckCircle2 className="size-3.5 shrink-0 text-ok" aria-hidden="true" />,
  near: <AlertTriangle className="size-3.5 shrink-0 text-watch" aria-hidden="true" />,
  over: <AlertTriangle className="size-3.5 shrink-0 text-alarm" aria-hidden="true" />,
};

/**
 * The load of a cell at a glance: an icon, the booked time over the working time, a bar, and the word
 * "Over". The words are those of the cell's spoken name (label in name): "5 h 30 min" "of 8 h 30 min".
 */
function LoadLine({ l, wide }: { l: TechnicianDayLoad | undefined; wide?: boolean }) {
  if (!l) return <span className="text-slate">—</span>;
  const state = loadState(l);
  const off = l.capacityMinutes === 0;
  return (
    <span className="flex w-full flex-col gap-0.5">
      <span className={`flex items-start gap-1 ${wide ? 'flex-wrap' : ''}`}>
        <span className="mt-px">{stateIcon[state]}</span>
        {off && !l.bookedMinutes ? (
          <span className="text-slate">{gaugeText(l)}</span>
        ) : (
          <span className={`flex tabular ${wide ? 'flex-wrap gap-x-1' : 'flex-col'}`}>
            {/* The spaces keep the words apart for tools that read the text nodes one after another. */}
            <span className="font-semibold">{formatMinutes(l.bookedMinutes)}</span>{' '}
            <span className="text-slate">{off ? `on a ${offDayWord(l)}` : `of ${formatMinutes(l.capacityMinutes)}`}</span>
            {state === 'over' && (
              <>
                {' '}
                <strong className="font-semibold text-alarm">Over</strong>
              </>
            )}
            {state === 'near' && wide && (
              <>
                {' '}
                <span className="text-watch">Nearly full</span>
              </>
            )}
          </span>
        )}
      </span>
      {!off && <LoadBar l={l} />}
    </span>
  );
}

/** What a chip says to screen readers after its visible text (the visible text comes first: label in name). */
export function chipSuffix(e: BoardEntry, today: string, wide: boolean): string {
  const w = e.booking.workOrder;
  const leak = leakDeadline(w.leakRepairDueDate, today, e.start.date);
  const bits = [
    !wide && w.unitTag ? w.unitTag : null,
    w.priority === 'normal' || w.priority === 'low' ? `${priorityLabels[w.priority]} priority` : null,
    leak && leak.text !== leakBadge(leak) ? leak.text : null,
    // The badge says which rules; the reason and who are said here (shown in full in the details).
    overrideSummary(e.booking)?.sentence ?? null,
  ].filter(Boolean);
  return `${bits.length ? `, ${bits.join(', ')}` : ''}. Open to move, reassign or unbook.`;
}

/** A pause for screen readers between the parts of a chip (visible text stays contiguous). */
const Sep = () => <span className="sr-only">, </span>;

function leakBadge(leak: { overdue: boolean; text: string }): string {
  return leak.overdue ? 'Leak repair overdue' : leak.text;
}

function Chip({
  e,
  tech,
  today,
  draggable,
  wide,
  nav,
  onOpen,
}: {
  e: BoardEntry;
  tech: Technician | undefined;
  today: string;
  draggable: boolean;
  wide: boolean;
  nav: string;
  onOpen: (b: Booking) => void;
}) {
  const b = e.booking;
  const w = b.workOrder;
  const leak = leakDeadline(w.leakRepairDueDate, today, e.start.date);
  const override = overrideSummary(b);
  const movable = draggable && w.state === 'booked' && !b.fixed && !e.fromEarlierDay;
  // Someone else (another dispatcher) just changed this booking: said on the chip for a minute.
  const changer = useChangedBy('booking', b.id);
  return (
    <button
      type="button"
      data-chip={b.id}
      data-nav-cell={nav}
      onClick={() => onOpen(b)}
      draggable={movable || undefined}
      onDragStart={
        movable
          ? (ev) => {
              ev.dataTransfer.setData(DRAG_BOOKING, b.id);
              ev.dataTransfer.setData('text/plain', `${workOrderLabel(w.number)} ${w.siteName}`);
              ev.dataTransfer.effectAllowed = 'move';
            }
          : undefined
      }
      className={`block w-full rounded border border-l-[3px] border-slate-line text-left leading-snug text-ink shadow-xs hover:bg-frost ${wide ? 'px-2 py-1 text-sm' : 'px-1 py-0.5 text-xs'} ${movable ? 'cursor-grab active:cursor-grabbing' : ''} ${w.state === 'closed' || w.state === 'cancelled' ? 'bg-frost' : 'bg-white'}`}
      style={{ borderLeftColor: colourOf(tech) }}
    >
      <span className="block font-semibold tabular">
        {entryTime(e)}
        <Sep />
      </span>
      <span className="block">
        <span className="font-medium">{workOrderLabel(w.number)}</span> {workOrderKindLabels[w.kind]}
        <Sep />
      </span>
      <span className="line-clamp-2 block text-slate" title={w.siteName}>
        {w.siteName}
        {wide && w.unitTag ? ` · ${w.unitTag}` : ''}
      </span>
      {(w.priority === 'emergency' || w.priority === 'high' || leak || w.state !== 'booked' || override || b.fixed) && (
        <span className="mt-0.5 flex flex-wrap gap-1">
          {w.priority === 'emergency' && (
            <span className="inline-flex items-center gap-0.5 rounded bg-alarm px-1 font-semibold text-white">
              <Siren className="size-3" aria-hidden="true" />
              <Sep />
              Emergency
            </span>
          )}
          {w.priority === 'high' && (
            <span className="rounded bg-watch-tint px-1 font-medium text-watch">
              <Sep />
              High priority
            </span>
          )}
          {leak && (
            <span
              className={`inline-flex items-center gap-0.5 rounded px-1 font-medium ${leak.overdue ? 'bg-alarm-tint text-alarm' : 'bg-watch-tint text-watch'}`}
            >
              <Droplet className="size-3" aria-hidden="true" />
              <Sep />
              {leakBadge(leak)}
            </span>
          )}
          {w.state !== 'booked' && (
            <span className="rounded bg-slate-faint px-1 font-medium">
              <Sep />
              {workOrderStateLabels[w.state]}
            </span>
          )}
          {override && (
            <span
              className="inline-flex items-center gap-0.5 rounded bg-watch-tint px-1 font-medium text-watch"
              data-testid="chip-override"
              title={override.sentence}
            >
              <ShieldAlert className="size-3" aria-hidden="true" />
              <Sep />
              {override.badge}
            </span>
          )}
          {b.fixed && (
            <span className="inline-flex items-center gap-0.5 rounded bg-slate-faint px-1">
              <Lock className="size-3" aria-hidden="true" />
              <Sep />
              Fixed time
            </span>
          )}
        </span>
      )}
      {override?.reason && (
        // The reason at a glance; in full in the screen-reader text and the booking's details.
        <span aria-hidden="true" className="mt-0.5 line-clamp-2 block text-slate italic" title={override.reason}>
          “{override.reason}”
        </span>
      )}
      {changer && (
        <>
          <Sep />
          <span className="mt-0.5 block font-medium text-copper-hover" data-testid="chip-changed-by">
            {changedByLabel(changer)}
          </span>
        </>
      )}
      <span className="sr-only">{chipSuffix(e, today, wide)}</span>
    </button>
  );
}

export function TechBoard(p: TechBoardProps) {
  const box = useRef<HTMLDivElement>(null);
  const narrow = useNarrow(box);
  const [dropAt, setDropAt] = useState<string | null>(null);

  // Narrow columns leave room for the days that matter: a day nobody works and nobody is booked on,
  // and a past day nobody was booked on. Future empty days stay wide: work gets dropped there.
  const { quiet, slim } = useMemo(() => {
    const empty = (d: string) => p.techs.every((t) => !p.cells.get(cellKey(t.id, d))?.length);
    const off = (d: string) => p.techs.every((t) => p.load?.get(cellKey(t.id, d))?.capacityMinutes === 0);
    const quiet = new Set(p.days.filter((d) => empty(d) && off(d)));
    const slim = new Set(p.days.filter((d) => !quiet.has(d) && empty(d) && d < p.today));
    return { quiet, slim };
  }, [p.days, p.techs, p.load, p.cells, p.today]);

  // A job picked from the unplaced work: focus moves to the first technician's cell, ready to choose.
  const placingId = p.placing?.id;
  const focusFirstCell = useEffectEvent(() => {
    const day = narrow ? p.day : p.days.includes(p.today) ? p.today : p.days[0];
    box.current?.querySelector<HTMLElement>(`[data-nav-head^="0:"][data-day="${day}"]`)?.focus();
  });
  // Only when a job is picked, not on every render.
  useEffect(() => {
    if (placingId) focusFirstCell();
  }, [placingId]);

  const accepts = (ev: DragEvent) => ev.dataTransfer.types.includes(DRAG_WORK_ORDER) || ev.dataTransfer.types.includes(DRAG_BOOKING);
  const dropProps = (techId: string, day: string) => {
    const key = cellKey(techId, day);
    return {
      onDragOver: (ev: DragEvent) => {
        if (!accepts(ev)) return;
        ev.preventDefault();
        ev.dataTransfer.dropEffect = ev.dataTransfer.types.includes(DRAG_BOOKING) ? 'move' : 'copy';
        setDropAt(key);
      },
      onDragLeave: (ev: DragEvent) => {
        if (!(ev.currentTarget as HTMLElement).contains(ev.relatedTarget as Node | null)) setDropAt((k) => (k === key ? null : k));
      },
      onDrop: (ev: DragEvent) => {
        ev.preventDefault();
        setDropAt(null);
        const wo = ev.dataTransfer.getData(DRAG_WORK_ORDER);
        if (wo) return p.onPlace(wo, techId, day);
        const id = ev.dataTransfer.getData(DRAG_BOOKING);
        const entry = [...p.cells.values()].flat().find((e) => e.booking.id === id);
        if (entry) p.onMoveTo(entry.booking, techId, day);
      },
      'data-drop-target': dropAt === key ? 'true' : undefined,
    };
  };

  /** Arrow keys: Left/Right move a day, Up/Down a technician (to the cell's heading). */
  const onKeyDown = (ev: KeyboardEvent<HTMLDivElement>) => {
    const from = (ev.target as HTMLElement).closest<HTMLElement>('[data-nav-cell]')?.dataset.navCell;
    if (!from) return;
    const [r, c] = from.split(':').map(Number) as [number, number];
    const move: Record<string, [number, number]> = { ArrowLeft: [0, -1], ArrowRight: [0, 1], ArrowUp: [-1, 0], ArrowDown: [1, 0] };
    const d = move[ev.key];
    if (!d) return;
    const target = box.current?.querySelector<HTMLElement>(`[data-nav-head="${r + d[0]}:${c + d[1]}"]`);
    if (target) {
      ev.preventDefault();
      target.focus();
    }
  };

  const placingName = p.placing ? `${workOrderLabel(p.placing.number)} ${workOrderKindLabels[p.placing.kind]}` : '';

  /** The top of a cell: its name, its load, and what activating it does. */
  const head = (t: Technician, d: string, r: number, c: number, count: number, wide: boolean) => {
    const l = p.load?.get(cellKey(t.id, d));
    const label = cellLabel(t.name, d, count, l, p.today);
    const nav = `${r}:${c}`;
    // Placing a job: a "Book here" on every day from today, the load still in view below it.
    if (p.placing && d >= p.today) {
      return (
        <>
          <button
            type="button"
            data-nav-head={nav}
            data-nav-cell={nav}
            data-day={d}
            aria-label={`Book here: ${placingName} for ${t.name} on ${dayLong(d)}. ${label}`}
            onClick={() => p.onPlace(p.placing!.id, t.id, d)}
            className={`flex w-full items-center gap-1 rounded border border-dashed border-coolant bg-coolant-tint px-1.5 py-1 text-left font-medium text-coolant hover:bg-white ${wide ? 'min-h-touch text-sm' : 'text-xs'}`}
          >
            <Plus className="size-3.5 shrink-0" aria-hidden="true" />
            Book here
          </button>
          {/* Already part of the button's name. */}
          <span aria-hidden="true" className={`block px-1 pt-1 ${wide ? 'text-sm' : 'text-xs'}`}>
            <LoadLine l={l} wide={wide} />
          </span>
        </>
      );
    }
    return (
      <button
        type="button"
        data-nav-head={nav}
        data-nav-cell={nav}
        data-day={d}
        aria-label={label}
        aria-describedby="board-head-hint"
        onClick={() => p.onOpenDay(t.id, d)}
        className={`flex w-full rounded px-1 py-1 text-left hover:bg-slate-faint ${wide ? 'text-sm' : 'text-xs'}`}
      >
        <LoadLine l={l} wide={wide} />
      </button>
    );
  };

  const hint = (
    <p id="board-head-hint" className="sr-only">
      Opens this technician’s day on the time grid.
    </p>
  );

  const placingBanner = p.placing && (
    <div
      role="status"
      className="mb-2 flex flex-wrap items-center gap-2 rounded-md border border-coolant bg-coolant-tint px-3 py-2 text-sm"
    >
      <span className="flex-1">
        Booking <strong>{placingName}</strong> at {p.placing.siteName}: choose a technician’s day below.
      </span>
      <Button size="sm" variant="secondary" onClick={p.onCancelPlacing}>
        <X className="size-4" aria-hidden="true" /> Cancel
      </Button>
    </div>
  );

  if (narrow) {
    const idx = Math.max(0, p.days.indexOf(p.day));
    const day = p.days[idx]!;
    const c = idx;
    return (
      <div ref={box} onKeyDown={onKeyDown} data-board-layout="pager">
        {hint}
        {placingBanner}
        <div role="group" aria-label="Day of the week" className="mb-2 grid grid-cols-7 gap-1">
          {p.days.map((d) => {
            const over = p.techs.some((t) => p.load?.get(cellKey(t.id, d))?.overloaded);
            return (
              <button
                key={d}
                type="button"
                aria-pressed={d === day}
                onClick={() => p.onPickDay(d)}
                className={`flex min-h-touch flex-col items-center justify-center rounded-md border text-xs leading-tight ${d === day ? 'border-ink bg-ink text-white' : 'border-slate-line bg-white'} ${d === p.today && d !== day ? 'border-coolant text-coolant' : ''}`}
              >
                {/* Named by what it shows ("Wed 2") and, for screen readers, the month and what matters. */}
                <span>{weekdayName(d)}</span>{' '}
                <span className="flex items-center gap-0.5 font-semibold tabular">
                  {Number(d.slice(8))}
                  {over && <AlertTriangle className={`size-3 ${d === day ? 'text-white' : 'text-alarm'}`} aria-hidden="true" />}
                </span>
                <span className="sr-only">
                  {` ${monthName(d)}${d === p.today ? ', today' : ''}${over ? ', a technician is over capacity' : ''}`}
                </span>
              </button>
            );
          })}
        </div>
        <div className="mb-2 flex items-center gap-2">
          <Button variant="secondary" className="min-w-touch" aria-label="Previous day" onClick={() => p.onPickDay(addDays(day, -1))}>
            <ChevronLeft className="size-5" aria-hidden="true" />
          </Button>
          <h3 className="flex-1 text-center text-base font-semibold" aria-live="polite">
            {dayLong(day)}
            {day === p.today && <span className="ml-2 rounded bg-coolant-tint px-1.5 py-0.5 text-xs font-medium text-coolant">Today</span>}
          </h3>
          <Button variant="secondary" className="min-w-touch" aria-label="Next day" onClick={() => p.onPickDay(addDays(day, 1))}>
            <ChevronRight className="size-5" aria-hidden="true" />
          </Button>
        </div>
        <ul className="flex flex-col gap-3" aria-label={`Technicians on ${dayLong(day)}`}>
          {p.techs.map((t, r) => {
            const entries = p.cells.get(cellKey(t.id, day)) ?? [];
            return (
              <li
                key={t.id}
                className="rounded-md border border-slate-line p-2"
                data-testid={`board-${t.id}-${day}`}
                {...dropProps(t.id, day)}
              >
                <h4 className="flex items-center gap-2 px-1 text-sm font-semibold">
                  <TechSwatch tech={t} />
                  {t.name}
                </h4>
                {head(t, day, r, c, entries.length, true)}
                <CellList entries={entries} tech={t} today={p.today} draggable={false} wide nav={`${r}:${c}`} onOpen={p.onOpen} />
              </li>
            );
          })}
        </ul>
      </div>
    );
  }

  return (
    <div ref={box} onKeyDown={onKeyDown} data-board-layout="table">
      {hint}
      {placingBanner}
      <table className="w-full table-fixed border-collapse text-sm">
        <caption className="sr-only">
          Technician board: each technician’s load and bookings per day, {dayShort(p.days[0]!)} to {dayShort(p.days[6]!)}
        </caption>
        <colgroup>
          <col className="w-28" />
          {p.days.map((d) => (
            <col key={d} className={quiet.has(d) ? 'w-16' : slim.has(d) ? 'w-24' : ''} />
          ))}
        </colgroup>
        <thead>
          <tr>
            <th
              scope="col"
              className="sticky top-14 z-10 bg-white px-1 pb-1 text-left text-xs font-semibold uppercase tracking-wide text-slate"
            >
              Technician
            </th>
            {p.days.map((d) => (
              <th
                key={d}
                scope="col"
                aria-current={d === p.today ? 'date' : undefined}
                className={`sticky top-14 z-10 border-b-2 bg-white px-1 pb-1 pt-1 text-left text-xs font-semibold ${d === p.today ? 'border-coolant text-coolant' : 'border-transparent text-ink'}`}
              >
                <span className="block">{quiet.has(d) ? weekdayName(d) : dayShort(d)}</span>
                {d === p.today ? (
                  <span className="block font-medium">Today</span>
                ) : quiet.has(d) ? (
                  <span className="block font-normal text-slate">{Number(d.slice(8))}</span>
                ) : null}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {p.techs.map((t, r) => {
            const week = p.days.map((d) => p.load?.get(cellKey(t.id, d)));
            const booked = week.reduce((s, l) => s + (l?.bookedMinutes ?? 0), 0);
            const capacity = week.reduce((s, l) => s + (l?.capacityMinutes ?? 0), 0);
            return (
              <tr key={t.id} className="border-t border-slate-line">
                <th scope="row" className="px-1 py-2 text-left align-top font-medium">
                  <span className="flex items-start gap-1.5">
                    <span className="mt-1">
                      <TechSwatch tech={t} />
                    </span>
                    <span className="min-w-0">
                      <span className="block leading-snug">{t.name}</span>
                      {p.load && (
                        // The week's total at a glance; kept out of the row's spoken name, which every cell repeats.
                        <span
                          aria-hidden="true"
                          className="block text-xs font-normal text-slate tabular"
                          title="Booked of working hours this week"
                        >
                          {tightMinutes(booked)} / {tightMinutes(capacity)} week
                        </span>
                      )}
                    </span>
                  </span>
                </th>
                {p.days.map((d, c) => {
                  const entries = p.cells.get(cellKey(t.id, d)) ?? [];
                  const drop = dropProps(t.id, d);
                  return (
                    <td
                      key={d}
                      data-testid={`board-${t.id}-${d}`}
                      {...drop}
                      className={`border-l border-slate-line/70 p-0.5 align-top ${d === p.today ? 'bg-coolant-tint' : ''} ${drop['data-drop-target'] ? 'outline-2 -outline-offset-2 outline-coolant' : ''}`}
                    >
                      {quiet.has(d) ? (
                        <QuietHead t={t} d={d} r={r} c={c} load={p.load?.get(cellKey(t.id, d))} today={p.today} onOpenDay={p.onOpenDay} />
                      ) : (
                        head(t, d, r, c, entries.length, false)
                      )}
                      <CellList entries={entries} tech={t} today={p.today} draggable wide={false} nav={`${r}:${c}`} onOpen={p.onOpen} />
                    </td>
                  );
                })}
              </tr>
            );
          })}
        </tbody>
      </table>
      <p className="mt-2 text-xs text-slate">
        Drag a job from the unplaced work onto a technician’s day to book it, or a booking to another day or technician to move it. Arrow
        keys move between days and technicians; a day’s heading opens it on the time grid.
      </p>
    </div>
  );
}

/**
 * The head of a day nobody works: "Off", or "Holiday" on the branch's holiday — a word of the cell's
 * spoken name ("…: no bookings, Day off" / "…, Holiday"), so what is seen is what is heard.
 */
function QuietHead({
  t,
  d,
  r,
  c,
  load,
  today,
  onOpenDay,
}: {
  t: Technician;
  d: string;
  r: number;
  c: number;
  load: TechnicianDayLoad | undefined;
  today: string;
  onOpenDay: (techId: string, day: string) => void;
}) {
  const label = cellLabel(t.name, d, 0, load, today);
  return (
    <button
      type="button"
      data-nav-head={`${r}:${c}`}
      data-nav-cell={`${r}:${c}`}
      aria-label={label}
      aria-describedby="board-head-hint"
      onClick={() => onOpenDay(t.id, d)}
      className="flex w-full items-center justify-center gap-1 rounded px-1 py-1 text-xs text-slate hover:bg-slate-faint"
    >
      <Moon className="size-3.5 shrink-0" aria-hidden="true" />
      {load?.holiday ? 'Holiday' : 'Off'}
    </button>
  );
}

function LoadBar({ l }: { l: TechnicianDayLoad }) {
  const state = loadState(l);
  const bar = state === 'over' ? 'bg-alarm' : state === 'near' ? 'bg-watch-base' : 'bg-coolant';
  return (
    <span className="block h-1.5 w-full overflow-hidden rounded bg-slate-faint" aria-hidden="true">
      <span
        className={`block h-full ${bar}`}
        style={{ width: `${Math.min(100, Math.round((l.bookedMinutes / l.capacityMinutes) * 100))}%` }}
      />
    </span>
  );
}

function CellList({
  entries,
  tech,
  today,
  draggable,
  wide,
  nav,
  onOpen,
}: {
  entries: BoardEntry[];
  tech: Technician;
  today: string;
  draggable: boolean;
  wide: boolean;
  nav: string;
  onOpen: (b: Booking) => void;
}) {
  if (!entries.length) return null;
  return (
    <ul className={`mt-1 grid gap-1 ${wide ? 'sm:grid-cols-2' : ''}`}>
      {entries.map((e) => (
        <li key={e.booking.id}>
          <Chip e={e} tech={tech} today={today} draggable={draggable} wide={wide} nav={nav} onOpen={onOpen} />
        </li>
      ))}
    </ul>
  );
}
