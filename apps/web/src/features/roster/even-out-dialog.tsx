import { useEffect, useState } from 'react';
import type { Technician } from '@coilpath/contract';
import { priorityLabels } from '@coilpath/contract/vocabulary';
import { workOrderLabel } from '@coilpath/contract/work-orders';
import { Button } from '@/components/ui/button';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { formatInZone, formatMinutes } from '@/lib/format';
import { useEvenOutApply, useEvenOutPreview } from './api';
import { Modal, Refusal, TechSwatch } from './parts';

/** A copy of the set with `id` added, or taken out when it was there. */
function flipped(s: ReadonlySet<string>, id: string): Set<string> {
  const n = new Set(s);
  if (n.has(id)) n.delete(id);
  else n.add(id);
  return n;
}

/** Even out: a preview of proposed bookings for the week's unplaced work; the dispatcher accepts all, some or none. */
export function EvenOutDialog({
  open,
  branchId,
  week,
  techs,
  timeZone,
  onClose,
}: {
  open: boolean;
  branchId: string;
  week: string;
  techs: Technician[];
  timeZone: string;
  onClose: () => void;
}) {
  return (
    <Modal open={open} onClose={onClose} title="Even out this week" wide>
      {open && <Body branchId={branchId} week={week} techs={techs} timeZone={timeZone} onClose={onClose} />}
    </Modal>
  );
}

function Body({
  branchId,
  week,
  techs,
  timeZone,
  onClose,
}: {
  branchId: string;
  week: string;
  techs: Technician[];
  timeZone: string;
  onClose: () => void;
}) {
  const notify = useNotify();
  const preview = useEvenOutPreview();
  const apply = useEvenOutApply();
  const [chosen, setChosen] = useState<Set<string>>(new Set());
  const [chosenMoves, setChosenMoves] = useState<Set<string>>(new Set());
  const { mutate } = preview;
  useEffect(() => {
    mutate(
      { branchId, week },
      {
        onSuccess: (p) => {
          setChosen(new Set(p.proposals.map((x) => x.workOrderId)));
          setChosenMoves(new Set(p.moves.map((m) => m.bookingId)));
        },
      },
    );
  }, [branchId, week, mutate]);

  const techOf = (id: string) => techs.find((t) => t.id === id);
  if (preview.isPending || preview.isIdle) return <p role="status">Working out a balanced week…</p>;
  if (preview.isError) return <Refusal message={errorMessage(preview.error)} />;
  const p = preview.data;

  const toggle = (id: string) => setChosen((s) => flipped(s, id));
  const toggleMove = (id: string) => setChosenMoves((s) => flipped(s, id));

  function accept() {
    const proposals = p.proposals
      .filter((x) => chosen.has(x.workOrderId))
      .map(({ workOrderId, techId, startAt, endAt }) => ({ workOrderId, techId, startAt, endAt }));
    const moves = p.moves
      .filter((m) => chosenMoves.has(m.bookingId))
      .map((m) => ({ bookingId: m.bookingId, version: m.version, techId: m.to.techId, startAt: m.to.startAt, endAt: m.to.endAt }));
    apply.mutate(
      { proposals, moves },
      {
        onSuccess: () => {
          const said = [
            proposals.length ? `booked ${proposals.length} job${proposals.length === 1 ? '' : 's'}` : '',
            moves.length ? `moved ${moves.length} booking${moves.length === 1 ? '' : 's'}` : '',
          ].filter(Boolean);
          notify(`Even out: ${said.join(' and ')}.`);
          onClose();
        },
      },
    );
  }

  const minutes = (a: string, b: string) => (Date.parse(b) - Date.parse(a)) / 60_000;
  const chosenLoad = new Map<string, number>();
  const addLoad = (techId: string, m: number) => chosenLoad.set(techId, (chosenLoad.get(techId) ?? 0) + m);
  for (const x of p.proposals) if (chosen.has(x.workOrderId)) addLoad(x.techId, minutes(x.startAt, x.endAt));
  for (const m of p.moves) {
    if (!chosenMoves.has(m.bookingId)) continue;
    addLoad(m.from.techId, -minutes(m.from.startAt, m.from.endAt));
    addLoad(m.to.techId, minutes(m.to.startAt, m.to.endAt));
  }
  const percent = (x: number) => `${Math.round(x * 100)} %`;
  const picked = chosen.size + chosenMoves.size;

  return (
    <div className="flex flex-col gap-4">
      <p className="text-sm text-slate">
        Week of {p.week.from} to {p.week.to}. Coilpath proposes times for the unplaced work so that nobody goes over their working hours,
        the load is even and the drive stays short. It may also move booked jobs that have not started (never a fixed one, never past its
        due time, never to a technician without the skill or EPA 608 certification) where that evens out the load. Untick what you do not
        want.
      </p>
      {p.proposals.length === 0 ? (
        <p className="rounded-md border border-dashed border-slate-line p-4 text-sm">
          No new booking proposed: there is no unplaced work for this week, or none fits.
        </p>
      ) : (
        <div className="overflow-x-auto">
          <table className="w-full text-sm">
            <caption className="sr-only">Proposed bookings</caption>
            <thead className="text-left text-xs uppercase tracking-wide text-slate">
              <tr>
                <th scope="col" className="px-2 py-1">
                  <span className="sr-only">Accept</span>
                </th>
                <th scope="col" className="px-2 py-1">
                  Job
                </th>
                <th scope="col" className="px-2 py-1">
                  Technician
                </th>
                <th scope="col" className="px-2 py-1">
                  When ({timeZone})
                </th>
                <th scope="col" className="px-2 py-1">
                  Drive
                </th>
              </tr>
            </thead>
            <tbody>
              {p.proposals.map((x) => (
                <tr key={x.workOrderId} className="border-t border-slate-line/70">
                  <td className="px-2 py-1">
                    <input
                      type="checkbox"
                      className="size-5"
                      checked={chosen.has(x.workOrderId)}
                      onChange={() => toggle(x.workOrderId)}
                      aria-label={`Accept ${workOrderLabel(x.number)} for ${techOf(x.techId)?.name ?? 'technician'}`}
                    />
                  </td>
                  <td className="px-2 py-1">
                    {workOrderLabel(x.number)} · {x.siteName}
                  </td>
                  <td className="px-2 py-1">
                    <span className="inline-flex items-center gap-2">
                      <TechSwatch tech={techOf(x.techId)} />
                      {techOf(x.techId)?.name}
                    </span>
                  </td>
                  <td className="tabular px-2 py-1">
                    {formatInZone(x.startAt, timeZone, 'EEE d MMM, HH:mm')}–{formatInZone(x.endAt, timeZone, 'HH:mm')}
                  </td>
                  <td className="tabular px-2 py-1">{x.travelMinutes ?? '—'} min</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      {p.moves.length > 0 && (
        <div className="overflow-x-auto">
          <table className="w-full text-sm">
            <caption className="mb-1 text-left text-sm font-semibold">
              Moves of booked jobs ({p.moves.length}), soonest due first — the spread of load goes from {percent(p.spread.withoutMoves)} to{' '}
              {percent(p.spread.after)}
            </caption>
            <thead className="text-left text-xs uppercase tracking-wide text-slate">
              <tr>
                <th scope="col" className="px-2 py-1">
                  <span className="sr-only">Accept</span>
                </th>
                <th scope="col" className="px-2 py-1">
                  Job
                </th>
                <th scope="col" className="px-2 py-1">
                  Priority
                </th>
                <th scope="col" className="px-2 py-1">
                  Due
                </th>
                <th scope="col" className="px-2 py-1">
                  From
                </th>
                <th scope="col" className="px-2 py-1">
                  To
                </th>
              </tr>
            </thead>
            <tbody>
              {p.moves.map((m) => (
                <tr key={m.bookingId} className="border-t border-slate-line/70">
                  <td className="px-2 py-1">
                    <input
                      type="checkbox"
                      className="size-5"
                      checked={chosenMoves.has(m.bookingId)}
                      onChange={() => toggleMove(m.bookingId)}
                      aria-label={`Move ${workOrderLabel(m.number)} from ${techOf(m.from.techId)?.name ?? 'technician'} to ${techOf(m.to.techId)?.name ?? 'technician'}`}
                    />
                  </td>
                  <td className="px-2 py-1">
                    {workOrderLabel(m.number)} · {m.siteName}
                  </td>
                  <td className="px-2 py-1">{priorityLabels[m.priority]}</td>
                  <td className="tabular px-2 py-1 whitespace-nowrap">
                    {m.dueAt ? formatInZone(m.dueAt, timeZone, 'EEE d MMM, HH:mm') : '—'}
                  </td>
                  <td className="px-2 py-1 whitespace-nowrap">
                    {techOf(m.from.techId)?.name}, {formatInZone(m.from.startAt, timeZone, 'EEE d MMM, HH:mm')}
                  </td>
                  <td className="px-2 py-1 whitespace-nowrap">
                    <span aria-hidden="true">→ </span>
                    {techOf(m.to.techId)?.name}, {formatInZone(m.to.startAt, timeZone, 'EEE d MMM, HH:mm')}–
                    {formatInZone(m.to.endAt, timeZone, 'HH:mm')}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      {p.leftUnplaced.length > 0 && (
        <div>
          <h3 className="text-sm font-semibold">Left unplaced</h3>
          <ul className="list-disc pl-5 text-sm">
            {p.leftUnplaced.map((u) => (
              <li key={u.workOrderId}>
                {workOrderLabel(u.number)}: {u.reason}
              </li>
            ))}
          </ul>
        </div>
      )}
      <div className="overflow-x-auto">
        <table className="w-full text-sm">
          <caption className="mb-1 text-left text-sm font-semibold">Week load per technician</caption>
          <thead className="text-left text-xs uppercase tracking-wide text-slate">
            <tr>
              <th scope="col" className="px-2 py-1">
                Technician
              </th>
              <th scope="col" className="px-2 py-1">
                Before
              </th>
              <th scope="col" className="px-2 py-1">
                After (ticked)
              </th>
              <th scope="col" className="px-2 py-1">
                Working hours
              </th>
            </tr>
          </thead>
          <tbody>
            {p.load.map((l) => {
              const after = l.beforeMinutes + (chosenLoad.get(l.techId) ?? 0);
              return (
                <tr key={l.techId} className="border-t border-slate-line/70">
                  <th scope="row" className="px-2 py-1 text-left font-medium">
                    <span className="inline-flex items-center gap-2">
                      <TechSwatch tech={techOf(l.techId)} />
                      {techOf(l.techId)?.name}
                    </span>
                  </th>
                  <td className="tabular px-2 py-1">{formatMinutes(l.beforeMinutes)}</td>
                  <td className={`tabular px-2 py-1 ${after > l.capacityMinutes ? 'font-semibold text-alarm' : ''}`}>
                    {formatMinutes(after)}
                    {after > l.capacityMinutes ? ' (over)' : ''}
                  </td>
                  <td className="tabular px-2 py-1">{formatMinutes(l.capacityMinutes)}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      <p className="text-sm">
        Estimated drive for the week: <strong className="tabular">{formatMinutes(p.driveMinutes.before)}</strong> now,{' '}
        <strong className="tabular">{formatMinutes(p.driveMinutes.after)}</strong> with every proposal.
      </p>
      {apply.isError && <Refusal message={errorMessage(apply.error)} />}
      <div className="flex flex-wrap gap-2">
        <Button onClick={accept} busy={apply.isPending} disabled={picked === 0}>
          Apply {picked} selected
        </Button>
        {p.proposals.length > 0 && (
          <Button
            variant="secondary"
            onClick={() => setChosen(chosen.size === p.proposals.length ? new Set() : new Set(p.proposals.map((x) => x.workOrderId)))}
          >
            {chosen.size === p.proposals.length ? 'Untick all' : 'Tick all'}
          </Button>
        )}
        <Button variant="ghost" onClick={onClose}>
          Change nothing
        </Button>
      </div>
    </div>
  );
}
