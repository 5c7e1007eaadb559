import { useEffect, useState } from 'react';
import type { Technician } from '@coilpath/contract';
import { workOrderLabel } from '@coilpath/contract';
import { Button } from '@/components/ui/button';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { formatInZone, formatMinutes } from '@/lib/format';
import { useEvenOutApply, useEvenOutPreview } from './api';
import { Modal, Refusal, TechSwatch } from './parts';

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

function Body({ branchId, week, techs, timeZone, onClose }: { branchId: string; week: string; techs: Technician[]; timeZone: string; onClose: () => void }) {
  const notify = useNotify();
  const preview = useEvenOutPreview();
  const apply = useEvenOutApply();
  const [chosen, setChosen] = useState<Set<string>>(new Set());
  const { mutate } = preview;
  useEffect(() => {
    mutate({ branchId, week }, { onSuccess: (p) => setChosen(new Set(p.proposals.map((x) => x.workOrderId))) });
  }, [branchId, week, mutate]);

  const techOf = (id: string) => techs.find((t) => t.id === id);
  if (preview.isPending || preview.isIdle) return <p role="status">Working out a balanced week…</p>;
  if (preview.isError) return <Refusal message={errorMessage(preview.error)} />;
  const p = preview.data;

  function toggle(id: string) {
    setChosen((s) => {
      const n = new Set(s);
      if (n.has(id)) n.delete(id);
      else n.add(id);
      return n;
    });
  }

  function accept() {
    const proposals = p.proposals.filter((x) => chosen.has(x.workOrderId)).map(({ workOrderId, techId, startAt, endAt }) => ({ workOrderId, techId, startAt, endAt }));
    apply.mutate(proposals, {
      onSuccess: (bs) => {
        notify(`Booked ${bs.length} job${bs.length === 1 ? '' : 's'} from the even-out proposal.`);
        onClose();
      },
    });
  }

  const chosenLoad = new Map<string, number>();
  for (const x of p.proposals) if (chosen.has(x.workOrderId)) chosenLoad.set(x.techId, (chosenLoad.get(x.techId) ?? 0) + (Date.parse(x.endAt) - Date.parse(x.startAt)) / 60_000);

  return (
    <div className="flex flex-col gap-4">
      <p className="text-sm text-slate">
        Week of {p.week.from} to {p.week.to}. Coilpath proposes times for the unplaced work so that nobody goes over their working hours, the load is even
        and the drive stays short. Existing bookings do not move. Untick what you do not want.
      </p>
      {p.proposals.length === 0 ? (
        <p className="rounded-md border border-dashed border-slate-line p-4 text-sm">No proposal: there is no unplaced work for this week, or none fits.</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="w-full text-sm">
            <caption className="sr-only">Proposed bookings</caption>
            <thead className="text-left text-xs uppercase tracking-wide text-slate">
              <tr>
                <th scope="col" className="px-2 py-1">
                  <span className="sr-only">Accept</span>
                </th>
                <th scope="col" className="px-2 py-1">Job</th>
                <th scope="col" className="px-2 py-1">Technician</th>
                <th scope="col" className="px-2 py-1">When ({timeZone})</th>
                <th scope="col" className="px-2 py-1">Drive</th>
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
              <th scope="col" className="px-2 py-1">Technician</th>
              <th scope="col" className="px-2 py-1">Before</th>
              <th scope="col" className="px-2 py-1">After (ticked)</th>
              <th scope="col" className="px-2 py-1">Working hours</th>
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
        <Button onClick={accept} busy={apply.isPending} disabled={chosen.size === 0}>
          Book {chosen.size} selected
        </Button>
        {p.proposals.length > 0 && (
          <Button variant="secondary" onClick={() => setChosen(chosen.size === p.proposals.length ? new Set() : new Set(p.proposals.map((x) => x.workOrderId)))}>
            {chosen.size === p.proposals.length ? 'Untick all' : 'Tick all'}
          </Button>
        )}
        <Button variant="ghost" onClick={onClose}>
          Book none
        </Button>
      </div>
    </div>
  );
}
