import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Paperclip } from 'lucide-react';
import { api } from '@/lib/api-client';
import { formatInZone } from '@/lib/format';
import { PageHeader, Card } from '@/components/ui/page';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { useBranch } from '@/lib/branch';

interface OutboxMessage {
  id: string;
  messageId: string | null;
  from: string;
  to: string;
  subject: string;
  text: string | null;
  html: string | null;
  receivedAt: string;
  attachments: { index: number; filename: string; contentType: string; size: number }[];
}

export default function OutboxPage() {
  const { timeZone } = useBranch();
  const [open, setOpen] = useState<string | null>(null);
  const q = useQuery({
    queryKey: ['outbox'],
    queryFn: () => api.get<{ messages: OutboxMessage[] }>('/api/outbox', undefined, { check: 'outboxListSchema' }).then((r) => r.messages),
  });
  return (
    <>
      <PageHeader
        title="Mail outbox"
        subtitle="Every e-mail Coilpath sent, as caught by the local mail sink (demo and development). Newest first."
      />
      {q.isPending ? (
        <LoadingState label="Loading messages…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      ) : q.data.length === 0 ? (
        <EmptyState title="No mail yet">
          Invitations, password resets, service summaries and the daily digest appear here once Coilpath sends them.
        </EmptyState>
      ) : (
        <ul className="flex flex-col gap-2">
          {q.data.map((m) => (
            <li key={m.id}>
              <Card>
                <button
                  type="button"
                  className="flex w-full flex-wrap items-baseline justify-between gap-2 text-left"
                  aria-expanded={open === m.id}
                  onClick={() => setOpen(open === m.id ? null : m.id)}
                >
                  <span className="font-medium">{m.subject}</span>
                  <span className="text-sm text-slate">
                    to {m.to} · {formatInZone(m.receivedAt, timeZone)}
                  </span>
                </button>
                {open === m.id && (
                  <div className="mt-3 border-t border-slate-line pt-3">
                    <dl className="mb-3 grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
                      <dt className="text-slate">From</dt>
                      <dd className="break-all">{m.from}</dd>
                      <dt className="text-slate">Message-ID</dt>
                      <dd className="break-all font-mono text-xs leading-5">{m.messageId ?? 'none recorded'}</dd>
                    </dl>
                    <div className="grid gap-3 lg:grid-cols-2">
                      <section aria-label={`Plain-text part of ${m.subject}`}>
                        <h3 className="mb-1 text-sm font-semibold">Plain text</h3>
                        {/* Focusable so the scrolling text can be read with the keyboard. */}
                        <pre
                          tabIndex={0}
                          className="max-h-96 overflow-auto whitespace-pre-wrap rounded border border-slate-line bg-frost p-3 font-sans text-sm"
                        >
                          {m.text ?? 'This message has no plain-text part.'}
                        </pre>
                      </section>
                      <section aria-label={`HTML part of ${m.subject}`}>
                        <h3 className="mb-1 text-sm font-semibold">HTML</h3>
                        {m.html ? (
                          // Shown as sent, in a sandbox: no scripts, no forms, no access to Coilpath's page.
                          <iframe
                            title={`HTML part of ${m.subject}`}
                            sandbox=""
                            srcDoc={m.html}
                            className="h-96 w-full rounded border border-slate-line bg-white"
                          />
                        ) : (
                          <p className="text-sm text-slate">This message has no HTML part.</p>
                        )}
                      </section>
                    </div>
                    {m.attachments.length > 0 && (
                      <ul aria-label="Attachments" className="mt-3 flex flex-wrap gap-2">
                        {m.attachments.map((a) => (
                          <li key={a.index}>
                            <a
                              className="inline-flex min-h-9 items-center gap-1 rounded border border-slate-line px-2 text-sm text-coolant"
                              href={`/api/outbox/${m.id}/attachments/${a.index}`}
                            >
                              <Paperclip className="size-4" aria-hidden="true" /> {a.filename} ({Math.ceil(a.size / 1024)} KB)
                            </a>
                          </li>
                        ))}
                      </ul>
                    )}
                  </div>
                )}
              </Card>
            </li>
          ))}
        </ul>
      )}
    </>
  );
}
