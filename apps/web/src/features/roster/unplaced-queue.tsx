import { useEffect, useMemo, useRef, useState } from 'react';
import { Draggable } from '@fullcalendar/interaction';
import { createColumnHelper } from '@tanstack/react-table';
import { AlertTriangle, GripVertical } from 'lucide-react';
import type { WorkOrder } from '@coilpath/contract';
import { priorities, priorityLabels, workOrderKindLabels, workOrderKinds, workOrderLabel, type Priority } from '@coilpath/contract';
import { DataTable, type CoilpathFeatures } from '@/components/ui/data-table';
import { Button } from '@/components/ui/button';
import { Badge } from '@/components/ui/page';
import { formatInZone } from '@/lib/format';
import { leakDeadline } from './parts';

const rank: Record<Priority, number> = { emergency: 0, high: 1, normal: 2, low: 3 };
const tone: Record<Priority, 'alarm' | 'watch' | 'neutral' | 'info'> = { emergency: 'alarm', high: 'watch', normal: 'neutral', low: 'info' };
const col = createColumnHelper<CoilpathFeatures, WorkOrder>();

function age(createdAt: string, now: number): string {
  const h = Math.max(0, Math.floor((now - Date.parse(createdAt)) / 3_600_000));
  return h < 24 ? `${h} h` : `${Math.floor(h / 24)} d`;
}

/**
 * Work waiting for a time and a technician. Each row's handle can be dragged onto the calendar
 * (FullCalendar's Draggable), or booked from a form with "Book…".
 */
export function UnplacedQueue({
  workOrders,
  timeZone,
  today,
  onBook,
}: {
  workOrders: WorkOrder[];
  timeZone: string;
  today: string;
  onBook: (w: WorkOrder) => void;
}) {
  const box = useRef<HTMLDivElement>(null);
  const [kind, setKind] = useState('');
  const [priority, setPriority] = useState('');
  const [skill, setSkill] = useState('');
  const now = Date.now();

  useEffect(() => {
    if (!box.current) return;
    const d = new Draggable(box.current, {
      itemSelector: '[data-wo-id]',
      eventData: (el) => ({ title: el.getAttribute('data-title') ?? '', duration: { minutes: Number(el.getAttribute('data-minutes') ?? 60) }, create: false }),
    });
    return () => d.destroy();
  }, []);

  const skills = useMemo(() => [...new Set(workOrders.map((w) => w.requiredSkill).filter((s): s is string => !!s))].sort(), [workOrders]);
  const rows = useMemo(
    () =>
      workOrders.filter((w) => (!kind || w.kind === kind) && (!priority || w.priority === priority) && (!skill || (skill === '-' ? !w.requiredSkill : w.requiredSkill === skill))),
    [workOrders, kind, priority, skill],
  );

  const columns = useMemo(
    () => [
      col.accessor((w) => w.number, {
        id: 'job',
        header: 'Job',
        cell: ({ row }) => {
          const w = row.original;
          const label = `${workOrderLabel(w.number)} ${workOrderKindLabels[w.kind]} at ${w.siteName}`;
          return (
            <div className="flex items-start gap-1">
              <button
                type="button"
                data-wo-id={w.id}
                data-title={label}
                data-minutes={w.estimatedMinutes}
                aria-label={`Drag ${label} onto the calendar`}
                title="Drag onto the calendar"
                className="-ml-1 inline-flex min-h-touch min-w-8 cursor-grab touch-none items-center justify-center rounded text-slate hover:bg-slate-faint active:cursor-grabbing"
              >
                <GripVertical className="size-4" aria-hidden="true" />
              </button>
              <div className="min-w-0">
                <div className="font-medium">{workOrderLabel(w.number)}</div>
                <div className="text-xs text-slate">{workOrderKindLabels[w.kind]}</div>
                <div className="text-xs text-slate">{Math.round((w.estimatedMinutes / 60) * 10) / 10} h</div>
              </div>
            </div>
          );
        },
      }),
      col.accessor((w) => rank[w.priority], {
        id: 'priority',
        header: 'Priority',
        cell: ({ row }) => <Badge tone={tone[row.original.priority]}>{priorityLabels[row.original.priority]}</Badge>,
      }),
      col.accessor((w) => w.siteName, {
        id: 'site',
        header: 'Site',
        cell: ({ row }) => {
          const w = row.original;
          const leak = leakDeadline(w.leakRepairDueDate, today);
          return (
            <div className="min-w-32">
              <div>{w.siteName}</div>
              {w.unitTag && <div className="text-xs text-slate">{w.unitTag} · {w.unitMake} {w.unitModel}</div>}
              {w.originNumber && <div className="text-xs text-slate">From {workOrderLabel(w.originNumber)}</div>}
              {leak && (
                <div className={`text-xs font-medium ${leak.overdue ? 'text-alarm' : 'text-watch'}`}>
                  <AlertTriangle className="mr-0.5 inline size-3" aria-hidden="true" />
                  {leak.text}
                </div>
              )}
            </div>
          );
        },
      }),
      col.accessor((w) => Date.parse(w.createdAt), {
        id: 'age',
        header: 'Age',
        cell: ({ row }) => age(row.original.createdAt, now),
      }),
      col.accessor((w) => (w.slaDueAt ?? w.latestAt ? Date.parse((w.slaDueAt ?? w.latestAt)!) : Number.MAX_SAFE_INTEGER), {
        id: 'due',
        header: 'Due',
        cell: ({ row }) => {
          const due = row.original.slaDueAt ?? row.original.latestAt;
          if (!due) return <span className="text-slate">—</span>;
          const late = Date.parse(due) < now;
          return (
            <span className={late ? 'font-semibold text-alarm' : ''}>
              {late && <AlertTriangle className="mr-0.5 inline size-3" aria-hidden="true" />}
              {formatInZone(due, timeZone, 'EEE d MMM HH:mm')}
              {late ? ' (late)' : ''}
            </span>
          );
        },
      }),
      col.accessor((w) => w.requiredSkill ?? '', {
        id: 'skill',
        header: 'Needs',
        cell: ({ row }) => {
          const w = row.original;
          const bits = [w.requiredSkill, w.requiredCertification ? `EPA 608 ${w.requiredCertification === 'universal' ? 'Universal' : `Type ${w.requiredCertification}`}` : null].filter(Boolean);
          return bits.length ? <span className="text-xs">{bits.join(' · ')}</span> : <span className="text-slate">—</span>;
        },
      }),
      col.display({
        id: 'actions',
        header: () => <span className="sr-only">Actions</span>,
        cell: ({ row }) => (
          <Button size="sm" variant="secondary" onClick={() => onBook(row.original)} aria-label={`Book ${workOrderLabel(row.original.number)}…`}>
            Book…
          </Button>
        ),
      }),
    ],
    [now, onBook, timeZone, today],
  );

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
      </div>
      <p className="text-xs text-slate" aria-live="polite">
        {rows.length === workOrders.length ? `${rows.length} jobs waiting` : `${rows.length} of ${workOrders.length} jobs shown`}
      </p>
      <DataTable
        caption="Unplaced work: jobs waiting for a time and a technician"
        columns={columns}
        data={rows}
        getRowId={(w) => w.id}
        empty={workOrders.length ? 'No job matches these filters.' : 'Nothing waiting. New work orders and return visits to book appear here.'}
      />
    </div>
  );
}
