import { AlertTriangle, CheckCircle2, CloudOff, LoaderCircle, RotateCw } from 'lucide-react';
import { errorMessage } from '@/lib/api-client';
import { Button } from '@/components/ui/button';

/**
 * The state of a save as the technician needs to see it: saving, saved, not saved yet and
 * retrying (with a button to retry now), offline, or refused with the server's reason.
 */
export function SaveStatus({
  pending,
  failureCount,
  paused,
  error,
  dirty,
  savedText = 'Saved',
  onRetry,
}: {
  pending: boolean;
  failureCount: number;
  paused: boolean;
  error: unknown;
  dirty: boolean;
  savedText?: string;
  onRetry?: (() => void) | undefined;
}) {
  let body;
  if (paused) {
    body = (
      <span className="inline-flex items-center gap-1 text-watch">
        <CloudOff className="size-4" aria-hidden="true" /> Not saved yet — offline. Kept on this phone; it saves when the connection is
        back.
      </span>
    );
  } else if (pending && failureCount > 0) {
    body = (
      <span className="inline-flex flex-wrap items-center gap-2 text-watch">
        <LoaderCircle className="size-4 animate-spin" aria-hidden="true" /> Not saved yet — retrying (attempt {failureCount + 1}). Kept on
        this phone.
      </span>
    );
  } else if (pending) {
    body = (
      <span className="inline-flex items-center gap-1 text-slate">
        <LoaderCircle className="size-4 animate-spin" aria-hidden="true" /> Saving…
      </span>
    );
  } else if (error) {
    body = (
      <span className="inline-flex flex-wrap items-center gap-2 text-alarm">
        <AlertTriangle className="size-4" aria-hidden="true" /> Not saved: {errorMessage(error)} Your entries are kept on this phone.
        {onRetry && (
          <Button variant="secondary" onClick={onRetry}>
            <RotateCw className="size-4" aria-hidden="true" /> Retry now
          </Button>
        )}
      </span>
    );
  } else if (dirty) {
    body = <span className="text-slate">Not saved yet — kept on this phone until you save.</span>;
  } else {
    body = (
      <span className="inline-flex items-center gap-1 text-ok">
        <CheckCircle2 className="size-4" aria-hidden="true" /> {savedText}
      </span>
    );
  }
  return (
    <p role="status" aria-live="polite" className="text-sm">
      {body}
    </p>
  );
}
