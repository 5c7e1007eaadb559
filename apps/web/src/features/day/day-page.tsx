import { useEffect, useMemo, useState } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { queryOptions, useQuery, useQueryClient } from '@tanstack/react-query';
import { ArrowDown, ArrowUp, ChevronLeft, ChevronRight, ClipboardCheck, KeyRound, MapPin, RotateCcw } from 'lucide-react';
import { planRoute } from '@coilpath/calc';
import { priorityLabels, unitKindLabels, visitOutcomeLabels, workOrderKindLabels } from '@coilpath/contract/vocabulary';
import { visitStatusLabels } from '@coilpath/contract/visit-status';
import type { DayResponse, DayStop } from '@coilpath/contract';
import { Button } from '@/components/ui/button';
import { Badge, Card, PageHeader } from '@/components/ui/page';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { useNotify } from '@/components/ui/notices';
import { api } from '@/lib/api-client';
import { formatInZone, formatMinutes, todayInZone, viewerZoneDiffers, zoneAbbreviation } from '@/lib/format';
import { useBranch } from '@/lib/branch';
import { StateButton } from '@/components/visit-state-button';
import { OutboxPanel } from '@/components/outbox-panel';
import { briefingQuery, unitFileQuery, visitQuery } from '@/lib/visit-queries';
import { useOnline } from '@/lib/online';
import { appTimeOf } from '@/lib/now';
import { RouteSketch } from './route-sketch';
import { UnitBriefingView } from './unit-briefing';
import { CalendarFeedCard } from './calendar-feed';

// Opened online, Route always asks the server again (the office may have changed the day since the phone kept it).
const dayQuery = (date: string | undefined) =>
  queryOptions({
    queryKey: ['day', date ?? 'today'],
    queryFn: () => api.get<DayResponse>('/api/day', { date }, { check: 'dayResponseSchema' }),
    refetchOnMount: 'always',
  });

const orderKey = (date: string) => `coilpath.day-order.${date}`;

function shiftDate(date: string, days: number): string {
  const d = new Date(`${date}T12:00:00Z`);
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}

const statusTone = { booked: 'neutral', en_route: 'info', on_site: 'brand', closed: 'ok' } as const;

/** The order saved on this phone for the day, if it still names exactly the day's stops. */
function savedOrder(day: DayResponse): string[] | null {
  try {
    const raw = localStorage.getItem(orderKey(day.date));
    const saved = raw ? (JSON.parse(raw) as string[]) : null;
    const ids = new Set(day.stops.map((s) => s.visitId));
    return saved && saved.length === ids.size && saved.every((id) => ids.has(id)) ? saved : null;
  } catch {
    return null;
  }
}

/** The hand-made order for the date, if it still names exactly the day's stops. */
function useManualOrder(day: DayResponse | undefined) {
  const [order, setOrder] = useState<string[] | null>(null);
  // Each new answer for the day reads the saved order again.
  const [orderFor, setOrderFor] = useState<DayResponse | undefined>(undefined);
  if (day && day !== orderFor) {
    setOrderFor(day);
    setOrder(savedOrder(day));
  }
  const save = (next: string[] | null) => {
    if (!day) return;
    if (next) localStorage.setItem(orderKey(day.date), JSON.stringify(next));
    else localStorage.removeItem(orderKey(day.date));
    setOrder(next);
  };
  return [order, save] as const;
}

function StopCard({
  stop,
  index,
  count,
  arrival,
  late,
  timeZone,
  today,
  onMove,
}: {
  stop: DayStop;
  index: number;
  count: number;
  arrival: { arriveAt: string; legMinutes: number; waitMinutes: number; lateMinutes: number } | undefined;
  late: boolean;
  timeZone: string;
  today: string;
  onMove(dir: -1 | 1): void;
}) {
  const wo = stop.workOrder;
  const done = stop.status === 'closed';
  return (
    <li>
      <Card>
        <div className="flex items-start gap-3">
          <span
            aria-hidden="true"
            className={`flex size-9 shrink-0 items-center justify-center rounded-full text-sm font-semibold text-white ${done ? 'bg-ok' : 'bg-copper'}`}
          >
            {index + 1}
          </span>
          <div className="min-w-0 flex-1">
            <h2 className="text-lg font-semibold leading-tight">
              <span className="sr-only">Stop {index + 1}: </span>
              {stop.site.name}
            </h2>
            <p className="text-sm text-slate">
              {stop.site.address}
              {stop.site.city ? `, ${stop.site.city}` : ''}
            </p>
            <div className="mt-1 flex flex-wrap items-center gap-1">
              <Badge tone={statusTone[stop.status]}>
                {visitStatusLabels[stop.status]}
                {done && stop.outcome ? `: ${visitOutcomeLabels[stop.outcome]}` : ''}
              </Badge>
              <Badge>
                WO-{wo.number} {workOrderKindLabels[wo.kind]}
              </Badge>
              {wo.priority !== 'normal' && (
                <Badge tone={wo.priority === 'emergency' ? 'alarm' : wo.priority === 'high' ? 'watch' : 'neutral'}>
                  {priorityLabels[wo.priority]}
                </Badge>
              )}
            </div>
          </div>
          <div className="flex flex-col gap-1">
            <Button
              size="sm"
              variant="ghost"
              aria-label={`Move ${stop.site.name} earlier`}
              disabled={index === 0}
              onClick={() => onMove(-1)}
              className="min-h-11 min-w-11"
            >
              <ArrowUp className="size-4" aria-hidden="true" />
            </Button>
            <Button
              size="sm"
              variant="ghost"
              aria-label={`Move ${stop.site.name} later`}
              disabled={index === count - 1}
              onClick={() => onMove(1)}
              className="min-h-11 min-w-11"
            >
              <ArrowDown className="size-4" aria-hidden="true" />
            </Button>
          </div>
        </div>

        <dl className="mt-3 grid grid-cols-2 gap-x-4 gap-y-1 text-sm tabular-nums sm:grid-cols-4">
          <div>
            <dt className="text-slate">Booked</dt>
            <dd>
              {formatInZone(stop.booking.startAt, timeZone, 'HH:mm')}–{formatInZone(stop.booking.endAt, timeZone, 'HH:mm')}
              {stop.booking.fixed ? ' (fixed)' : ''}
            </dd>
          </div>
          <div>
            <dt className="text-slate">Estimated arrival</dt>
            <dd className={late ? 'font-medium text-alarm' : ''}>
              {arrival ? formatInZone(arrival.arriveAt, timeZone, 'HH:mm') : '—'}
              {late && arrival ? ` (${Math.round(arrival.lateMinutes)} min late)` : ''}
            </dd>
          </div>
          <div>
            <dt className="text-slate">Drive</dt>
            <dd>{arrival ? formatMinutes(arrival.legMinutes) : '—'}</dd>
          </div>
          <div>
            <dt className="text-slate">On site</dt>
            <dd>{formatMinutes(wo.estimatedMinutes)}</dd>
          </div>
        </dl>

        <p className="mt-3 text-sm">
          <span className="text-slate">Complaint: </span>
          {wo.complaint || '—'}
        </p>
        {stop.site.accessNotes && (
          <p className="mt-1 flex items-start gap-1 text-sm">
            <KeyRound className="mt-0.5 size-4 shrink-0 text-slate" aria-hidden="true" />
            <span>
              <span className="text-slate">Access: </span>
              {stop.site.accessNotes}
            </span>
          </p>
        )}
        <p className="mt-1 text-sm">
          <span className="text-slate">Units: </span>
          {stop.units.length
            ? stop.units.map((u) => `${u.tag} (${unitKindLabels[u.kind]}, ${u.make} ${u.model}, ${u.refrigerant})`).join('; ')
            : 'none on file'}
        </p>

        <div className="mt-3 flex flex-wrap gap-2">
          <StateButton where="day" visit={{ id: stop.visitId, status: stop.status, canWrite: !done }} />
          {stop.status !== 'on_site' && (
            <Link
              to={`/visits/${stop.visitId}`}
              className="inline-flex min-h-12 items-center justify-center gap-2 rounded-md border border-slate-line bg-white px-5 text-base font-medium hover:bg-slate-faint"
            >
              <ClipboardCheck className="size-5" aria-hidden="true" /> Open visit
            </Link>
          )}
        </div>

        {stop.units.map((u) => (
          <details key={u.id} className="mt-3 rounded-md border border-slate-line" open={!done && index === 0 && stop.units.length === 1}>
            <summary className="flex min-h-11 cursor-pointer items-center px-3 text-sm font-medium">Unit briefing: {u.tag}</summary>
            <div className="border-t border-slate-line p-3">
              <UnitBriefingView unitId={u.id} timeZone={timeZone} today={today} />
            </div>
          </details>
        ))}
      </Card>
    </li>
  );
}

export default function DayPage() {
  const notify = useNotify();
  const qc = useQueryClient();
  const { branch } = useBranch();
  const [params, setParams] = useSearchParams();
  const date = params.get('date') ?? undefined;
  const q = useQuery(dayQuery(date));
  const day = q.data;
  const [manualOrder, setManualOrder] = useManualOrder(day);

  // Kept for the day: while there is a connection, fetch every stop's visit, unit briefing and unit file, and
  // the next working day's route with its stops' too; the phone keeps them (lib/query-persist.ts) for the roof.
  const online = useOnline();
  useEffect(() => {
    if (!day || !online) return;
    const keepUnits = (d: DayResponse) => {
      for (const s of d.stops) {
        void qc.prefetchQuery(visitQuery(s.visitId));
        for (const u of s.units) {
          void qc.prefetchQuery(briefingQuery(u.id));
          void qc.prefetchQuery(unitFileQuery(u.id));
        }
      }
    };
    keepUnits(day);
    if (day.nextWorkingDate) {
      void qc.prefetchQuery(dayQuery(day.nextWorkingDate)).then(() => {
        const next = qc.getQueryData(dayQuery(day.nextWorkingDate).queryKey);
        if (next) keepUnits(next);
      });
    }
  }, [day, online, qc]);

  const route = useMemo(() => {
    if (!day) return null;
    if (!manualOrder) return day.route;
    const plan = planRoute({
      start: day.route.start,
      stops: day.stops.map((s) => s.routeStop),
      dayStart: day.route.dayStart,
      order: manualOrder,
    });
    let prev = 0;
    return {
      ...day.route,
      ...plan,
      arrivals: plan.arrivals.map((a) => {
        const leg = a.arrive - prev;
        prev = a.depart;
        return { ...a, legMinutes: leg };
      }),
    };
  }, [day, manualOrder]);

  // Offline with nothing kept for this day: say so, rather than loading until the signal returns.
  if (q.isPending && q.fetchStatus === 'paused') {
    return (
      <EmptyState title="This day is not kept on this device">
        There is no connection, and this day was not opened here while there was one. It loads when the connection is back.
      </EmptyState>
    );
  }
  if (q.isPending) return <LoadingState label="Loading your day…" />;
  if (q.isError) return <ErrorState error={q.error} onRetry={() => q.refetch()} />;
  const d = q.data;
  const tz = d.timeZone;
  const today = todayInZone(tz);
  const byId = new Map(d.stops.map((s) => [s.visitId, s]));
  const ordered = route!.order.map((id) => byId.get(id)!).filter(Boolean);
  const arrivals = new Map(route!.arrivals.map((a) => [a.id, a]));
  const next = ordered.find((s) => s.status !== 'closed');
  const dateLabel = formatInZone(`${d.date}T12:00:00Z`, 'UTC', 'EEEE d MMMM yyyy');
  // Offline, the route shows what the phone kept: say when it was fetched ("as of 06:42", the branch's time).
  const fetchedAt = q.dataUpdatedAt ? appTimeOf(q.dataUpdatedAt) : null;
  const asOf = fetchedAt ? formatInZone(fetchedAt, tz, todayInZone(tz, fetchedAt) === today ? 'HH:mm' : 'EEE d MMM, HH:mm') : null;

  const move = (index: number, dir: -1 | 1) => {
    const ids = ordered.map((s) => s.visitId);
    const j = index + dir;
    if (j < 0 || j >= ids.length) return;
    [ids[index], ids[j]] = [ids[j]!, ids[index]!];
    setManualOrder(ids);
    notify(`Moved ${byId.get(ids[j]!)!.site.name} ${dir < 0 ? 'earlier' : 'later'}; estimates updated.`);
  };

  return (
    <>
      <PageHeader
        title="Route"
        subtitle={
          <>
            Your stops in route order · {d.branch.name || branch?.name} · {dateLabel}
            {viewerZoneDiffers(tz) ? ` · times in ${zoneAbbreviation(d.route.dayStart, tz)}` : ''}
          </>
        }
        actions={next ? <StateButton where="day" visit={{ id: next.visitId, status: next.status, canWrite: true }} /> : undefined}
      />
      {!online && asOf && (
        <p role="status" className="mb-4 rounded-md border border-watch-base/40 bg-watch-tint p-3 text-sm">
          <strong className="font-semibold">Kept on this phone, as of {asOf}.</strong> Changes the office made since then show when the
          connection is back.
        </p>
      )}
      <OutboxPanel />
      <nav aria-label="Choose the day" className="mb-4 flex flex-wrap items-center gap-2">
        <Button variant="secondary" onClick={() => setParams({ date: shiftDate(d.date, -1) })}>
          <ChevronLeft className="size-4" aria-hidden="true" /> Previous day
        </Button>
        {d.date !== today && (
          <Button variant="secondary" onClick={() => setParams({})}>
            Today
          </Button>
        )}
        <Button variant="secondary" onClick={() => setParams({ date: shiftDate(d.date, 1) })}>
          Next day <ChevronRight className="size-4" aria-hidden="true" />
        </Button>
      </nav>

      {d.stops.length === 0 ? (
        <div className="flex flex-col gap-4">
          <EmptyState title="No stops booked for this day">
            Visits appear here once the office books them for you on the Roster. Your route, arrival estimates and unit briefings follow.
          </EmptyState>
          <CalendarFeedCard feed={d.calendarFeed} />
        </div>
      ) : (
        <div className="grid grid-cols-1 gap-4 lg:grid-cols-[1fr_380px]">
          <ol className="flex flex-col gap-3" aria-label="Stops in route order">
            {ordered.map((s, i) => (
              <StopCard
                key={s.visitId}
                stop={s}
                index={i}
                count={ordered.length}
                arrival={arrivals.get(s.visitId)}
                late={route!.lateStops.includes(s.visitId)}
                timeZone={tz}
                today={today}
                onMove={(dir) => move(i, dir)}
              />
            ))}
          </ol>
          <div className="flex flex-col gap-4 lg:sticky lg:top-20 lg:self-start">
            <Card title="Route">
              <RouteSketch
                start={d.route.start}
                stops={ordered.map((s) => ({
                  id: s.visitId,
                  lat: s.site.lat,
                  lon: s.site.lon,
                  label: s.site.name,
                  done: s.status === 'closed',
                }))}
              />
              <p className="mt-2 text-sm tabular-nums">
                <MapPin className="mr-1 inline size-4 text-slate" aria-hidden="true" />
                From {d.route.start.label}, leaving {formatInZone(d.route.dayStart, tz, 'HH:mm')}: {ordered.length} stop
                {ordered.length === 1 ? '' : 's'}, {formatMinutes(route!.driveMinutes)} driving, about {route!.totalMiles.toFixed(0)} mi.
              </p>
              {route!.lateStops.length > 0 && (
                <p className="mt-1 text-sm font-medium text-alarm">
                  {route!.lateStops.length} stop{route!.lateStops.length === 1 ? '' : 's'} would be reached after the appointment window.
                </p>
              )}
              <p className="mt-1 text-xs text-slate">
                Drive times are estimates from straight-line distance; the order respects appointment windows.
              </p>
              {manualOrder && (
                <Button
                  variant="ghost"
                  className="mt-2"
                  onClick={() => {
                    setManualOrder(null);
                    notify('Back to the suggested order.');
                  }}
                >
                  <RotateCcw className="size-4" aria-hidden="true" /> Use the suggested order
                </Button>
              )}
            </Card>
            <CalendarFeedCard feed={d.calendarFeed} />
          </div>
        </div>
      )}
    </>
  );
}
