import { CloudOff } from 'lucide-react';
import { useOnline } from '@/lib/online';

/**
 * Says, while there is no connection, that the screen shows what this device kept (each save's own status
 * says whether it waits).
 * A status (polite), so a screen reader hears it once when the connection drops, not on every render.
 */
export function OfflineBanner() {
  const online = useOnline();
  return (
    <div role="status" aria-live="polite">
      {!online && (
        <p className="flex items-center gap-2 border-b border-watch-base bg-watch-tint px-3 py-2 text-sm text-ink md:px-6">
          <CloudOff className="size-4 shrink-0" aria-hidden="true" />
          <span>
            <strong className="font-semibold">Offline.</strong> Showing what this device kept until the connection is back; each save says whether it is waiting.
          </span>
        </p>
      )}
    </div>
  );
}
