import { Link } from 'react-router-dom';
import { MapPin, Navigation, Wrench } from 'lucide-react';
import type { VisitDetail } from '@coilpath/contract';
import { Button } from '@/components/ui/button';
import { useQueryClient, onlineManager } from '@tanstack/react-query';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { queueWrite } from '@/lib/visit-outbox';

/** The visit's next step (En route, On site, Record / Go to close-out), on the technician's route and on the visit screen. */
export function StateButton({
  visit,
  where = 'visit',
}: {
  visit: Pick<VisitDetail, 'id' | 'status' | 'canWrite'>;
  where?: 'visit' | 'day';
}) {
  const notify = useNotify();
  const qc = useQueryClient();
  if (!visit.canWrite) return null;
  // Through the outbox: shown at once, kept on the phone and sent in order (a refusal shows in the outbox panel).
  const go = (state: 'en_route' | 'on_site') => {
    const what = state === 'en_route' ? 'Marked en route' : 'Marked on site';
    return queueWrite(
      qc,
      { kind: 'state', visitId: visit.id, body: { state } },
      { sent: () => notify(`${what}.`), stopped: (e) => notify(`Not changed: ${e.problem?.message ?? 'refused'}`, 'alarm') },
    ).then(
      () => {
        if (!onlineManager.isOnline()) notify(`${what} on this phone; it is sent when the connection is back.`);
      },
      (e: unknown) => notify(`Not changed: ${errorMessage(e)}`, 'alarm'),
    );
  };
  if (visit.status === 'booked')
    return (
      <Button size="lg" onClick={() => void go('en_route')}>
        <Navigation className="size-5" aria-hidden="true" /> En route
      </Button>
    );
  if (visit.status === 'en_route')
    return (
      <Button size="lg" onClick={() => void go('on_site')}>
        <MapPin className="size-5" aria-hidden="true" /> On site
      </Button>
    );
  if (visit.status === 'on_site' && where === 'day')
    return (
      <Link
        to={`/visits/${visit.id}`}
        className="inline-flex min-h-12 items-center justify-center gap-2 rounded-md bg-copper px-5 text-base font-medium text-white hover:bg-copper-hover"
      >
        <Wrench className="size-5" aria-hidden="true" /> Record the visit
      </Link>
    );
  if (visit.status === 'on_site')
    return (
      <Button size="lg" variant="secondary" onClick={() => document.getElementById('close-out')?.scrollIntoView({ behavior: 'smooth' })}>
        <Wrench className="size-5" aria-hidden="true" /> Go to close-out
      </Button>
    );
  return null;
}
