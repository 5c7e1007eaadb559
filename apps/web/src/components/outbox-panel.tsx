import { AlertTriangle, CloudUpload, RotateCw, Trash2 } from 'lucide-react';
import { causeCodeLabels, visitOutcomeLabels } from '@coilpath/contract/vocabulary';
import { Button } from '@/components/ui/button';
import { useNotify } from '@/components/ui/notices';
import { useOnline } from '@/lib/online';
import { waitingText, type OutboxEntry, type OutboxWrite } from '@/lib/outbox';
import { useOutbox } from '@/lib/visit-outbox';

/** A write in the technician's words. */
export function describeWrite(w: OutboxWrite): string {
  switch (w.kind) {
    case 'state':
      return w.body.state === 'en_route' ? 'En route' : 'On site';
    case 'readings':
      return `Readings (${w.body.readings.length} circuit${w.body.readings.length === 1 ? '' : 's'})`;
    case 'finding':
      return `Finding: ${causeCodeLabels[w.body.causeCode]}`;
    case 'refrigerant':
      return `Refrigerant ${w.body.refrigerant}: ${(w.body.poundsAdded ?? 0).toFixed(1)} lb added, ${(w.body.poundsRecovered ?? 0).toFixed(1)} lb recovered`;
    case 'attachment':
      return `${w.attachKind === 'document' ? 'Document' : 'Photo'} ${w.fileName}`;
    case 'close':
      return `Close-out (${visitOutcomeLabels[w.body.outcome]})`;
  }
}

function StoppedEntry({ e }: { e: OutboxEntry }) {
  const where = e.place;
  const notify = useNotify();
  const { outbox } = useOutbox();
  const conflict = e.state === 'conflict';
  return (
    <li className="rounded-md border border-alarm/40 bg-alarm-tint p-3 text-sm">
      <p className="flex items-start gap-2">
        <AlertTriangle className="mt-0.5 size-4 shrink-0 text-alarm" aria-hidden="true" />
        <span>
          <strong className="font-semibold">
            {conflict ? 'Not sent — the visit changed at the office' : 'Not accepted'}: {describeWrite(e.write)}
            {where ? ` (${where})` : ''}.
          </strong>{' '}
          {e.problem?.message}
        </span>
      </p>
      <div className="mt-2 flex flex-wrap gap-2">
        <Button
          size="sm"
          variant="secondary"
          className="min-h-11"
          onClick={() => {
            void outbox.retry(e.id);
            notify(`Trying again: ${describeWrite(e.write)}.`);
          }}
        >
          <RotateCw className="size-4" aria-hidden="true" /> Try again
        </Button>
        <Button
          size="sm"
          variant="secondary"
          className="min-h-11"
          onClick={() => {
            void outbox.discard(e.id);
            notify(`Discarded: ${describeWrite(e.write)}. It was not saved.`);
          }}
        >
          <Trash2 className="size-4" aria-hidden="true" /> Discard
        </Button>
      </div>
    </li>
  );
}

/**
 * What the phone still has to send (one visit's, or all): the count waiting, and each write the server
 * refused or that conflicts with the office's change, with its reason and a way to discard it.
 */
export function OutboxPanel({ visitId }: { visitId?: string }) {
  const { entries } = useOutbox(visitId);
  const online = useOnline();
  const stopped = entries.filter((e) => e.state !== 'waiting');
  const waiting = entries.length - stopped.length;
  if (entries.length === 0) return null;
  return (
    <section aria-label="Changes waiting to send" className="mb-4 flex flex-col gap-2">
      {waiting > 0 && (
        <p role="status" className="flex items-center gap-2 rounded-md border border-watch-base/40 bg-watch-tint p-3 text-sm">
          <CloudUpload className="size-4 shrink-0" aria-hidden="true" />
          <span>
            <strong className="font-semibold">
              {waiting} change{waiting === 1 ? '' : 's'} waiting to send.
            </strong>{' '}
            {online
              ? 'Sending now, in the order you made them.'
              : 'Kept on this phone; they are sent in order when the connection is back.'}
          </span>
        </p>
      )}
      {stopped.length > 0 && (
        <ul className="flex flex-col gap-2" aria-label="Changes the server did not accept">
          {stopped.map((e) => (
            <StoppedEntry key={e.id} e={e} />
          ))}
        </ul>
      )}
    </section>
  );
}

/** "3 changes waiting to send", for the offline banner. */
export function useWaitingText(): string | null {
  return waitingText(useOutbox().entries);
}
