import { AlertTriangle, CheckCircle2, Moon } from 'lucide-react';
import type { Technician, TechnicianDayLoad } from '@coilpath/contract';
import { formatMinutes } from '@/lib/format';
import { gaugeText, loadState, offDayWord } from './board';
import { TechSwatch } from './parts';

const dayHeading = (day: string) =>
  new Date(`${day}T12:00:00Z`).toLocaleDateString('en-US', { weekday: 'short', day: 'numeric', timeZone: 'UTC' });

function Gauge({ l, techName }: { l: TechnicianDayLoad; techName: string }) {
  const offDay = l.capacityMinutes === 0;
  const ratio = l.ratio ?? (l.bookedMinutes > 0 ? Infinity : 0);
  const state = loadState(l);
  const pct = Math.min(100, Math.round((Number.isFinite(ratio) ? ratio : 1) * 100));
  const bar = state === 'over' ? 'bg-alarm' : state === 'near' ? 'bg-watch-base' : 'bg-coolant';
  const word =
    state === 'over'
      ? offDay
        ? `Booked on a ${offDayWord(l)}`
        : `Over by ${formatMinutes(l.bookedMinutes - l.capacityMinutes)}`
      : offDay
        ? null
        : state === 'near'
          ? 'Nearly full'
          : null;
  const text = gaugeText(l);
  return (
    <div
      className={`flex min-w-24 flex-col gap-1 rounded-md px-1.5 py-1.5 ${state === 'over' ? 'bg-alarm-tint' : ''}`}
      aria-label={`${techName}, ${dayHeading(l.day)}: ${text}${word ? `. ${word}` : ''}`}
      data-testid={`load-${l.techId}-${l.day}`}
    >
      <div className="flex items-start gap-1 text-xs leading-snug">
        {offDay && l.bookedMinutes === 0 ? (
          <Moon className="mt-px size-3.5 shrink-0 text-slate" aria-hidden="true" />
        ) : state === 'over' ? (
          <AlertTriangle className="mt-px size-3.5 shrink-0 text-alarm" aria-hidden="true" />
        ) : state === 'near' ? (
          <AlertTriangle className="mt-px size-3.5 shrink-0 text-watch" aria-hidden="true" />
        ) : (
          <CheckCircle2 className="mt-px size-3.5 shrink-0 text-ok" aria-hidden="true" />
        )}
        <span className={`tabular ${offDay && l.bookedMinutes === 0 ? 'text-slate' : ''}`}>{text}</span>
      </div>
      {!offDay && (
        <div className="h-1.5 w-full overflow-hidden rounded bg-slate-faint" aria-hidden="true">
          <div className={`h-full ${bar}`} style={{ width: `${pct}%` }} />
        </div>
      )}
      {word && <span className={`text-xs font-semibold ${state === 'over' ? 'text-alarm' : 'text-watch'}`}>{word}</span>}
    </div>
  );
}

/** Booked hours against working hours, per technician and day (from calc's technicianLoad). */
export function LoadGauge({ techs, days, load }: { techs: Technician[]; days: string[]; load: TechnicianDayLoad[] }) {
  const byKey = new Map(load.map((l) => [`${l.techId}|${l.day}`, l]));
  return (
    // Focusable so keyboard users can scroll it sideways on narrow screens (WCAG 2.1.1).
    <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Load per technician and day">
      <table className="w-full border-collapse text-sm">
        <caption className="sr-only">Load per technician and day: booked time against working hours</caption>
        <thead>
          <tr className="text-left text-xs uppercase tracking-wide text-slate">
            <th scope="col" className="px-2 py-1 font-semibold">
              Technician
            </th>
            {days.map((d) => (
              <th key={d} scope="col" className="px-2 py-1 font-semibold">
                {dayHeading(d)}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {techs.map((t) => (
            <tr key={t.id} className="border-t border-slate-line/70">
              <th scope="row" className="whitespace-nowrap px-2 py-1 text-left font-medium">
                <span className="inline-flex items-center gap-2">
                  <TechSwatch tech={t} />
                  {t.name}
                </span>
              </th>
              {days.map((d) => {
                const l = byKey.get(`${t.id}|${d}`);
                return (
                  <td key={d} className="px-1 py-1 align-top">
                    {l ? <Gauge l={l} techName={t.name} /> : <span className="text-slate">—</span>}
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
