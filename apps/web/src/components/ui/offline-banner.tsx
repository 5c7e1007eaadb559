import { CloudOff, CloudUpload } from 'lucide-react';
import { useOnline } from '@/lib/online';
import { waitingText } from '@/lib/outbox';
import { useOutbox } from '@/lib/visit-outbox';

/**
 * Says, while there is no connection, that the screen shows what this device kept, and how many of the
 * technician's changes wait in the outbox (also online, until they are sent).
 * A status (polite), so a screen reader hears it once when the connection drops, not on every render.
 */
export function OfflineBanner() {
  const online = useOnline();
  const { entries } = useOutbox();
  const waiting = waitingText(entries);
  const sending = entries.some((e) => e.state === 'waiting');
  return (
    <div role="status" aria-live="polite">
      {!online ? (
        <p className="flex items-center gap-2 border-b border-watch-base bg-watch-tint px-3 py-2 text-sm text-ink md:px-6">
          <CloudOff className="size-4 shrink-0" aria-hidden="true" />
          <span>
            <strong className="font-semibold">Offline.</strong> Showing what this device kept until the connection is back
            {waiting ? <>; {waiting}.</> : '; changes you make are kept here and sent in order.'}
          </span>
        </p>
      ) : (
        waiting && (
          <p className="flex items-center gap-2 border-b border-watch-base bg-watch-tint px-3 py-2 text-sm text-ink md:px-6">
            <CloudUpload className="size-4 shrink-0" aria-hidden="true" />
            <span>
              <strong className="font-semibold">{sending ? 'Sending.' : 'Not sent.'}</strong> {waiting[0]!.toUpperCase() + waiting.slice(1)}
              .
            </span>
          </p>
        )
      )}
    </div>
  );
}
