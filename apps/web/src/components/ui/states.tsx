import type { ReactNode } from 'react';
import { AlertTriangle, Inbox, LoaderCircle, RotateCw } from 'lucide-react';
import { errorMessage } from '@/lib/api-client';
import { Button } from './button';

export function LoadingState({ label = 'Loading…' }: { label?: string }) {
  return (
    <div role="status" aria-busy="true" className="flex items-center gap-3 p-6 text-slate">
      <LoaderCircle className="size-5 animate-spin" aria-hidden="true" />
      <span>{label}</span>
    </div>
  );
}

export function EmptyState({ title, children, action }: { title: string; children?: ReactNode; action?: ReactNode }) {
  return (
    <div className="flex flex-col items-start gap-2 rounded-lg border border-dashed border-slate-line bg-white p-6">
      <Inbox className="size-6 text-slate" aria-hidden="true" />
      <h2 className="text-base font-semibold">{title}</h2>
      {children && <div className="max-w-prose text-sm text-slate">{children}</div>}
      {action}
    </div>
  );
}

export function ErrorState({
  error,
  onRetry,
  title = 'This could not be loaded',
}: {
  error: unknown;
  onRetry?: () => void;
  title?: string;
}) {
  return (
    <div role="alert" className="flex flex-col items-start gap-2 rounded-lg border border-alarm/40 bg-alarm-tint p-5">
      <div className="flex items-center gap-2 font-semibold text-alarm">
        <AlertTriangle className="size-5" aria-hidden="true" />
        {title}
      </div>
      <p className="text-sm text-ink">{errorMessage(error)}</p>
      {onRetry && (
        <Button variant="secondary" onClick={onRetry}>
          <RotateCw className="size-4" aria-hidden="true" /> Try again
        </Button>
      )}
    </div>
  );
}
