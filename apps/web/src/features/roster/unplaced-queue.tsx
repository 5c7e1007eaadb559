import { useEffect, useMemo, useRef, useState } from 'react';
import { createColumnHelper, useTable } from '@tanstack/react-table';
import { AlertTriangle, GripVertical } from 'lucide-react';
import type { WorkOrder } from '@coilpath/contract';
import { priorities, priorityLabels, workOrderKindLabels, workOrderKinds } from '@coilpath/contract/vocabulary';
import { workOrderLabel } from '@coilpath/contract/work-orders';
import type { Priority } from '@coilpath/contract';
import { coilpathTableFeatures, type CoilpathFeatures, type SortingState } from '@/components/ui/data-table';
import { Button } from '@/components/ui/button';
import { Badge } from '@/components/ui/page';
import { formatInZone } from '@/lib/format';
import { DRAG_WORK_ORDER } from './board';
import { leakDeadline } from './parts';
import { appNowMs } from '@/lib/now';
import { ChangedByNote } from '@/components/changed-by';

/** Where a job's handle drags to: FullCalendar's time grids, or the technician board (native drag and drop). */
export type QueueMode = 'calendar' | 'board';

const rank: Record<Priority, number> = { emergency: 0, high: 1, normal: 2, low: 3 };
const tone: Record<Priority, 'alarm' | 'watch' | 'neutral' | 'info'> = {
  emergency: 'alarm',
  high: 'watch',
  normal: 'neutral',
  low: 'info',
};
const col = createColumnHelper<CoilpathFeatures, WorkOrder>();
type SortKey = 'priority' | 'age' | 'due' | 'skill' | 'kind';
const sortLabels: Record<SortKey, string> = {
  priority: 'Priority',
  age: 'Oldest first',
  due: 'Due soonest',
  skill: 'Required skill',
  kind: 'Kind',
};

export function QueueItem({
  w,
  timeZone,
  today,
  now,
  onBook,
  mode,
  picked,
  onPick,
}: {
  w: WorkOrder;
  timeZone: string;
  today: string;
  now: number;
  onBook: (w: WorkOrder) => void;
  mode: QueueMode;
  picked: boolean;
  onPick: (w: WorkOrder | null) => void;
}) {
  const label = `${workOrderLabel(w.number)} ${workOrderKindLabels[w.kind]} at ${w.siteName}`;
  const leak = leakDeadline(w.leakRepairDueDate, today);
  const due = w.slaDueAt ?? w.latestAt;
  const late = due ? Date.parse(due) < now : false;
  const needs = [
    w.requiredSkill,
    w.requiredCertification ? `EPA 608 ${w.requiredCertification === 'universal' ? 'Universal' : `Type ${w.requiredCertification}`}` : null,
  ].filter(Boolean);
  return (
    <li
      className={`flex items-start gap-1 rounded-md border bg-white p-2 ${picked ? 'border-coolant ring-2 ring-coolant/40' : 'border-slate-line'}`}
    >
      {mode === 'board' ? (
        <button
          type="button"
          draggable
          onDragStart={(ev) => {
            ev.dataTransfer.setData(DRAG_WORK_ORDER, w.id);
            ev.dataTransfer.setData('text/plain', label);
            ev.dataTransfer.effectAllowed = 'copy';
          }}
          onClick={() => onPick(picked ? null : w)}
          aria-pressed={picked}
          aria-label={`Place ${label} on the board`}
          title="Drag onto a technician’s day, or click and then choose the day"
          className={`inline-flex min-h-touch min-w-8 shrink-0 cursor-grab items-center justify-center rounded active:cursor-grabbing ${picked ? 'bg-coolant text-white' : 'text-slate hover:bg-slate-faint'}`}
        >
          <GripVertical className="size-4" aria-hidden="true" />
        </button>
      ) : (
        <button
          type="button"
          data-wo-id={w.id}
          data-title={label}
          data-minutes={w.estimatedMinutes}
          aria-label={`Drag ${label} onto the calendar`}
          title="Drag onto the calendar"
          className="inline-flex min-h-touch min-w-8 shrink-0 cursor-grab touch-none items-center justify-center rounded text-slate hover:bg-slate-faint active:cursor-grabbing"
        >
          <GripVertical className="size-4" aria-hidden="true" />
        </button>
      )}
      <div className="min-w-0 flex-1 text-sm">
        <div className="flex flex-wrap items-center gap-x-2 gap-y-1">
          <span className="font-semibold">{workOrderLabel(w.number)}</span>
          <span>{workOrderKindLabels[w.kind]}</span>
          <Badge tone={tone[w.priority]}>{priorityLabels[w.priority]}</Badge>
        </div>
        <div className="truncate">{w.siteName}</div>
        {w.modelAlert && (
          <div className="text-xs font-medium text-alarm">
            <AlertTriangle className="mr-0.5 inline size-3" aria-hidden="true" />
            Model-alert inspection: {w.modelAlert.title}
          </div>
        )}
        {w.unitTag && (
          <div className="truncate text-xs text-slate">
            {w.unitTag} · {w.unitMake} {w.unitModel}
          </div>
        )}
        <div className="mt-0.5 flex flex-wrap gap-x-3 text-xs text-slate">
          <span>{Math.round((w.estimatedMinutes / 60) * 10) / 10} h</span>
          <span>waiting {age(w.createdAt, now)}</span>
          {w.originNumber && <span>from {workOrderLabel(w.originNumber)}</span>}
          {needs.length > 0 && <span>needs {needs.join(', ')}</span>}
        </div>
        {due && (
          <div className={`text-xs ${late ? 'font-semibold text-alarm' : 'text-slate'}`}>
            {late && <AlertTriangle className="mr-0.5 inline size-3" aria-hidden="true" />}
            {late ? 'Late: was due' : 'Due'} {formatInZone(due, timeZone, 'EEE d MMM HH:mm')}
          </div>
        )}
        {leak && (
          <div className={`text-xs font-medium ${leak.overdue ? 'text-alarm' : 'text-watch'}`}>
            <AlertTriangle className="mr-0.5 inline size-3" aria-hidden="true" />
            {leak.text}
          </div>
        )}
        <ChangedByNote row="workOrder" id={w.id} className="block text-xs font-medium text-copper-hover" />
      </div>
      <Button size="sm" variant="secondary" className="shrink-0" onClick={() => onBook(w)} aria-label={`Book ${workOrderLabel(w.number)}…`}>
        Book…
      </Button>
    </li>
  );
}

function age(createdAt: string, now: number): string {
  const h = Math.max(0, Math.floor((now - Date.parse(createdAt)) / 3_600_000));
  return h < 24 ? `${h} h` : `${Math.floor(h / 24)} d`;
}

/**
 * Work waiting for a time and a technician. Each row's handle can be dragged onto the calendar
 * (FullCalendar's Draggable) or onto a technician's day on the board (or, on the board, clicked to
 * pick the job and then a day chosen), or booked from a form with "Book…".
 */
export function UnplacedQueue({
  workOrders,
  timeZone,
  today,
  onBook,
  mode = 'calendar',
  picked = null,
  onPick = () => undefined,
}: {
  workOrders: WorkOrder[];
  timeZone: string;
  today: string;
  onBook: (w: WorkOrder) => void;
  mode?: QueueMode;
  /** The job picked to place on the board. */
  picked?: string | null;
  onPick?: (w: WorkOrder | null) => void;
}) {
  const box = useRef<HTMLDivElement>(null);
  const [kind, setKind] = useState('');
  const [priority, setPriority] = useState('');
  const [skill, setSkill] = useState('');
  const now = appNowMs();

  // On the time grids the handles drag through FullCalendar, loaded with the calendar (not for the board).
  useEffect(() => {
    if (mode !== 'calendar') return;
    let live = true;
    let d: { destroy(): void } | undefined;
    void import('@fullcalendar/interaction').then(({ Draggable }) => {
      if (!live || !box.current) return;
      d = new Draggable(box.current, {
        itemSelector: '[data-wo-id]',
        eventData: (el) => ({
          title: el.getAttribute('data-title') ?? '',
          duration: { minutes: Number(el.getAttribute('data-minutes') ?? 60) },
          create: false,
        }),
      });
    });
    return () => {
      live = false;
      d?.destroy();
    };
  }, [mode]);

  const skills = useMemo(() => [...new Set(workOrders.map((w) => w.requiredSkill).filter((s): s is string => !!s))].sort(), [workOrders]);
  const rows = useMemo(
    () =>
      workOrders.filter(
        (w) =>
          (!kind || w.kind === kind) &&
          (!priority || w.priority === priority) &&
          (!skill || (skill === '-' ? !w.requiredSkill : w.requiredSkill === skill)),
      ),
    [workOrders, kind, priority, skill],
  );

  // Sorting runs through react-table's sorted row model; the rows render as cards to fit beside the calendar.
  const columns = useMemo(
    () =>
      col.columns([
        col.accessor((w) => rank[w.priority], { id: 'priority', header: 'Priority' }),
        col.accessor((w) => Date.parse(w.createdAt), { id: 'age', header: 'Age' }),
        col.accessor((w) => ((w.slaDueAt ?? w.latestAt) ? Date.parse((w.slaDueAt ?? w.latestAt)!) : Number.MAX_SAFE_INTEGER), {
          id: 'due',
          header: 'Due',
        }),
        col.accessor((w) => w.requiredSkill ?? '~', { id: 'skill', header: 'Skill' }),
        col.accessor((w) => w.kind, { id: 'kind', header: 'Kind' }),
      ]),
    [],
  );
  const [sortBy, setSortBy] = useState<SortKey>('priority');
  const sorting: SortingState = [
    { id: sortBy, desc: false },
    ...(sortBy === 'priority' ? [{ id: 'due', desc: false }] : [{ id: 'priority', desc: false }]),
  ];
  const table = useTable({ features: coilpathTableFeatures, columns, data: rows, state: { sorting }, getRowId: (w: WorkOrder) => w.id });
  const sorted = table.getRowModel().rows.map((r) => r.original);

  const select = 'min-h-9 rounded-md border border-slate-line bg-white px-2 text-sm';
  return (
    <div ref={box} className="flex flex-col gap-2">
      <div className="flex flex-wrap gap-2" role="group" aria-label="Filter the unplaced work">
        <label className="flex flex-col text-xs text-slate">
          Kind
          <select className={select} value={kind} onChange={(e) => setKind(e.target.value)}>
            <option value="">All kinds</option>
            {workOrderKinds.map((k) => (
              <option key={k} value={k}>
                {workOrderKindLabels[k]}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col text-xs text-slate">
          Priority
          <select className={select} value={priority} onChange={(e) => setPriority(e.target.value)}>
            <option value="">All priorities</option>
            {priorities.map((p) => (
              <option key={p} value={p}>
                {priorityLabels[p]}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col text-xs text-slate">
          Skill
          <select className={select} value={skill} onChange={(e) => setSkill(e.target.value)}>
            <option value="">Any skill</option>
            <option value="-">No special skill</option>
            {skills.map((s) => (
              <option key={s} value={s}>
                {s}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col text-xs text-slate">
          Sort by
          <select className={select} value={sortBy} onChange={(e) => setSortBy(e.target.value as SortKey)}>
            {(Object.keys(sortLabels) as SortKey[]).map((k) => (
              <option key={k} value={k}>
                {sortLabels[k]}
              </option>
            ))}
          </select>
        </label>
      </div>
      <p className="text-xs text-slate" aria-live="polite">
        {rows.length === workOrders.length ? `${rows.length} jobs waiting` : `${rows.length} of ${workOrders.length} jobs shown`}
      </p>
      {sorted.length === 0 ? (
        <p className="rounded-md border border-dashed border-slate-line p-4 text-sm text-slate">
          {workOrders.length ? 'No job matches these filters.' : 'Nothing waiting. New work orders and return visits to book appear here.'}
        </p>
      ) : (
        <ul className="flex max-h-[1100px] flex-col gap-2 overflow-y-auto" aria-label="Unplaced work, sorted">
          {sorted.map((w) => (
            <QueueItem
              key={w.id}
              w={w}
              timeZone={timeZone}
              today={today}
              now={now}
              onBook={onBook}
              mode={mode}
              picked={picked === w.id}
              onPick={onPick}
            />
          ))}
        </ul>
      )}
    </div>
  );
}
