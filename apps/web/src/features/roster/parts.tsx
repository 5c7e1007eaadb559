import { AlertTriangle } from 'lucide-react';
import type { Booking, Technician, WorkOrder } from '@coilpath/contract';
import { scheduleDay } from '@coilpath/contract/date-words';
import { epa608Labels, priorityLabels, workOrderKindLabels } from '@coilpath/contract/vocabulary';
import { workOrderLabel } from '@coilpath/contract/work-orders';
import { formatInZone } from '@/lib/format';
import { overrideSummary } from './rules';
import { instantToLocal } from './zone';
import { ChangedByNote } from '@/components/changed-by';

/**
 * The Roster's technician colours: the `tech-0..7` tokens of tailwind.config.ts (muted hues, each at
 * least 4.5:1 against white text). FullCalendar needs the values themselves for its event styles.
 */
export const techHex = ['#3F5E8C', '#6B4E8E', '#0F6E6E', '#8A4B2D', '#4D6B2E', '#7A3E5D', '#35566B', '#6A5A2E'] as const;
export const techBg = ['bg-tech-0', 'bg-tech-1', 'bg-tech-2', 'bg-tech-3', 'bg-tech-4', 'bg-tech-5', 'bg-tech-6', 'bg-tech-7'] as const;
export const colourOf = (t: Pick<Technician, 'colorIndex'> | undefined) => techHex[(((t?.colorIndex ?? 0) % 8) + 8) % 8]!;
export const bgOf = (t: Pick<Technician, 'colorIndex'> | undefined) => techBg[(((t?.colorIndex ?? 0) % 8) + 8) % 8]!;

export function TechSwatch({ tech }: { tech: Pick<Technician, 'colorIndex'> | undefined }) {
  return <span aria-hidden="true" className={`inline-block size-3 shrink-0 rounded-sm ${bgOf(tech)}`} />;
}

export const certLabel = (t: Technician) => (t.epa608Type === 'none' ? 'No EPA 608' : `EPA 608 ${epa608Labels[t.epa608Type]}`);

/** The Roster's dialogs are the shared one. */
export { Dialog as Modal } from '@/components/ui/dialog';

/** A refusal from the API, said in full where the action was taken. */
export function Refusal({ message }: { message: string | null | undefined }) {
  if (!message) return null;
  return (
    <p role="alert" className="flex items-start gap-2 rounded-md border border-alarm/40 bg-alarm-tint px-3 py-2 text-sm text-ink">
      <AlertTriangle className="mt-0.5 size-4 shrink-0 text-alarm" aria-hidden="true" />
      <span>{message}</span>
    </p>
  );
}

/** Whether the leak-repair deadline has passed today or falls before the booked day. */
export function leakDeadline(dueDate: string | null, today: string, bookedDay?: string): { overdue: boolean; text: string } | null {
  if (!dueDate) return null;
  const due = scheduleDay(dueDate, today);
  if (dueDate < today) return { overdue: true, text: `Leak repair overdue (due ${due})` };
  if (bookedDay && dueDate < bookedDay) return { overdue: true, text: `Booked after the leak-repair deadline (${due})` };
  return { overdue: false, text: `Leak repair due ${due}` };
}

export function workOrderTitle(w: Pick<WorkOrder, 'number' | 'kind'>) {
  return `${workOrderLabel(w.number)} · ${workOrderKindLabels[w.kind]}`;
}

/** What a calendar event shows at a glance. */
export function EventBody({
  booking,
  tech,
  showTech,
  timeZone,
  today,
  compact,
}: {
  booking: Booking;
  tech: Technician | undefined;
  showTech: boolean;
  timeZone: string;
  today: string;
  compact: boolean;
}) {
  const w = booking.workOrder;
  const start = instantToLocal(booking.startAt, timeZone);
  const leak = leakDeadline(w.leakRepairDueDate, today, start.date);
  const time = `${start.time}–${instantToLocal(booking.endAt, timeZone).time}`;
  const override = overrideSummary(booking);
  return (
    <div className="flex h-full flex-col gap-0.5 overflow-hidden px-1 py-0.5 text-[0.72rem] leading-tight text-white">
      <div className="font-semibold">
        {time}
        {compact ? '' : ` · ${workOrderKindLabels[w.kind]}`}
      </div>
      <div className="truncate">
        {workOrderLabel(w.number)} · {w.siteName}
      </div>
      {!compact && w.unitTag && (
        <div className="truncate opacity-95">
          {w.unitTag} {w.unitMake} {w.unitModel}
        </div>
      )}
      <div className="truncate">
        <span className="font-semibold">{priorityLabels[w.priority]}</span>
        {showTech && tech ? ` · ${compact ? tech.name.split(' ')[0] : tech.name}` : ''}
        {override ? ` · ${compact ? 'override' : override.badge.toLowerCase()}` : ''}
        {booking.fixed ? ' · fixed' : ''}
      </div>
      {override?.reason && !compact && <div className="truncate italic opacity-95">“{override.reason}”</div>}
      {leak?.overdue && (
        <div className="mt-0.5 inline-flex items-center gap-1 self-start rounded bg-white px-1 font-semibold text-alarm">
          <AlertTriangle className="size-3" aria-hidden="true" />
          {leak.text}
        </div>
      )}
      {/* Someone else just changed this booking; read after the event's name (its aria-describedby). */}
      <ChangedByNote row="booking" id={booking.id} className="mt-0.5 self-start truncate rounded bg-white px-1 font-semibold text-ink" />
    </div>
  );
}

/** What a calendar event's name says after the summary and site: the override, its reason and who. */
export function eventNameExtras(b: Booking): string {
  const override = overrideSummary(b);
  return override ? ` ${override.sentence}.` : '';
}

export function bookingSummary(b: Booking, tech: Technician | undefined, timeZone: string) {
  return `${workOrderLabel(b.workOrder.number)} with ${tech?.name ?? 'the technician'}, ${formatInZone(b.startAt, timeZone, 'EEE d MMM, HH:mm')}–${formatInZone(b.endAt, timeZone, 'HH:mm')}`;
}
