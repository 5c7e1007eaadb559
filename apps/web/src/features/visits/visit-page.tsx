import { useEffect } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { Phone } from 'lucide-react';
import { causeCodeLabels, epa608Labels, workOrderKindLabels } from '@coilpath/contract/vocabulary';
import { visitStatusLabels } from '@coilpath/contract/visit-status';
import { Badge, Card, PageHeader } from '@/components/ui/page';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { formatInZone } from '@/lib/format';
import { hasUnsaved, useVisitDraft } from './draft';
import { StateButton } from '@/components/visit-state-button';
import { OutboxPanel } from '@/components/outbox-panel';
import { currentVisitQuery } from './visit-api';
import { visitQuery } from '@/lib/visit-queries';
import { lazySection } from '@/components/ui/lazy-section';

/**
 * The work sections, below the job on a phone, are each their own chunk, fetched while the visit loads: the
 * first view waits for neither the refrigerants' saturation tables (readings), zod and the form library
 * (findings), nor the signature pad (close-out).
 */
const ReadingsSection = lazySection('Readings', () => import('./readings-section').then((m) => m.ReadingsSection));
const FindingsSection = lazySection('Findings', () => import('./findings-section').then((m) => m.FindingsSection));
const RefrigerantSection = lazySection('Refrigerant', () => import('./refrigerant-section').then((m) => m.RefrigerantSection));
const AttachmentsSection = lazySection('Photos and documents', () => import('./attachments-section').then((m) => m.AttachmentsSection));
const CloseSection = lazySection('Close-out', () => import('./close-section').then((m) => m.CloseSection));
const sections = [ReadingsSection, FindingsSection, RefrigerantSection, AttachmentsSection, CloseSection];

const statusTone = { booked: 'neutral', en_route: 'info', on_site: 'brand', closed: 'ok' } as const;

/** `/visits` without an id: the technician's current visit, or an honest empty state. */
function CurrentVisit() {
  const navigate = useNavigate();
  const q = useQuery(currentVisitQuery);
  useEffect(() => {
    if (q.data?.visitId) navigate(`/visits/${q.data.visitId}`, { replace: true });
  }, [q.data, navigate]);
  if (q.isPending || q.data?.visitId) return <LoadingState label="Finding your current visit…" />;
  if (q.isError) return <ErrorState error={q.error} onRetry={() => q.refetch()} />;
  return (
    <>
      <PageHeader title="Visit" subtitle="Record readings, findings, refrigerant and photos, and close the visit." />
      <EmptyState
        title="No current visit"
        action={
          <Link to="/day" className="inline-flex min-h-11 items-center text-coolant underline">
            Open Route
          </Link>
        }
      >
        You are not en route or on site, and no visit is booked for you from now on. When the office books one, it appears on Route; press
        “En route” there to start it.
      </EmptyState>
    </>
  );
}

function VisitScreen({ id }: { id: string }) {
  useEffect(() => sections.forEach((s) => s.preload()), []);
  const q = useQuery(visitQuery(id));
  const { draft, update, restored } = useVisitDraft(id);
  // Offline with nothing kept for this visit: say so, rather than loading until the signal returns.
  if (q.isPending && q.fetchStatus === 'paused')
    return (
      <EmptyState
        title="This visit is not kept on this device"
        action={
          <Link to="/day" className="inline-flex min-h-11 items-center text-coolant underline">
            Open Route
          </Link>
        }
      >
        There is no connection, and this visit was not opened here (or on its Route) while there was one. It loads when the connection is
        back.
      </EmptyState>
    );
  if (q.isPending) return <LoadingState label="Loading the visit…" />;
  if (q.isError)
    return (
      <>
        <OutboxPanel visitId={id} />
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      </>
    );
  const v = q.data;
  const tz = v.branch.timeZone;
  // A timeline whose events fall on more than one day (a visit reopened the next morning) dates each line.
  const timelineSpansDays = new Set(v.events.map((e) => formatInZone(e.at, tz, 'yyyy-MM-dd'))).size > 1;
  return (
    <>
      <PageHeader
        title={`Visit · WO-${v.workOrder.number ?? ''} ${workOrderKindLabels[v.workOrder.kind]}`}
        subtitle={
          <>
            {v.site.name} · {v.branch.name} ·{' '}
            {v.booking ? `${formatInZone(v.booking.startAt, tz)}–${formatInZone(v.booking.endAt, tz, 'HH:mm')}` : 'not booked'} ·{' '}
            {v.techName}
          </>
        }
        actions={
          <>
            <Badge tone={statusTone[v.status]}>{visitStatusLabels[v.status]}</Badge>
            <StateButton visit={v} />
          </>
        }
      />
      <OutboxPanel visitId={id} />
      {restored && hasUnsaved(draft) && (
        <p role="status" className="mb-4 rounded-md border border-watch-base/40 bg-watch-tint p-3 text-sm">
          Entries from your last session on this phone were restored. They are not saved yet: save them below.
        </p>
      )}
      {v.workOrder.modelAlert && (
        <p className="mb-4 rounded-md border border-alarm/30 bg-alarm-tint p-3 text-sm">
          <strong>Model-alert inspection: {v.workOrder.modelAlert.title}.</strong> A factory defect with this cause was found on this model
          at other sites. Check this unit for it and record a finding with the cause “{causeCodeLabels[v.workOrder.modelAlert.causeCode]}”
          if you find it.
          {v.workOrder.latestAt ? ` Due by ${formatInZone(v.workOrder.latestAt, tz, 'EEE d MMM yyyy')}.` : ''}
        </p>
      )}
      {v.recordRefusal && (
        // The API's own refusal: readings, findings and refrigerant are recorded on site.
        <p role="status" className="mb-4 rounded-md border border-coolant/40 bg-coolant-tint p-3 text-sm">
          {v.recordRefusal}
        </p>
      )}
      {!v.canWrite && v.status !== 'closed' && (
        <p className="mb-4 rounded-md bg-slate-faint p-3 text-sm">
          Read only: only {v.techName}, the assigned technician, records this visit’s work.
        </p>
      )}
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[2fr_1fr]">
        <div className="flex flex-col gap-4 lg:col-start-2 lg:row-start-1">
          <Card title="The job">
            <dl className="flex flex-col gap-2 text-sm">
              <div>
                <dt className="text-slate">Complaint</dt>
                <dd>{v.workOrder.complaint || '—'}</dd>
              </div>
              <div>
                <dt className="text-slate">Site</dt>
                <dd>
                  {v.site.name}, {v.site.address}
                  {v.site.city ? `, ${v.site.city}` : ''}
                </dd>
              </div>
              {v.site.accessNotes && (
                <div>
                  <dt className="text-slate">Access</dt>
                  <dd>{v.site.accessNotes}</dd>
                </div>
              )}
              {v.site.contactName && (
                <div>
                  <dt className="text-slate">Contact</dt>
                  <dd className="flex flex-wrap items-center gap-2">
                    {v.site.contactName}
                    {v.site.contactPhone && (
                      <a href={`tel:${v.site.contactPhone}`} className="inline-flex min-h-11 items-center gap-1 text-coolant">
                        <Phone className="size-4" aria-hidden="true" /> {v.site.contactPhone}
                      </a>
                    )}
                  </dd>
                </div>
              )}
              <div>
                <dt className="text-slate">Units</dt>
                <dd>
                  <ul>
                    {v.units.map((u) => (
                      <li key={u.id}>
                        <Link to={`/units/${u.id}`} className="inline-flex min-h-11 min-w-11 items-center text-coolant underline">
                          {u.tag}
                        </Link>{' '}
                        {u.make} {u.model} · {u.refrigerant}, full charge {u.fullChargeLb} lb · {u.circuits.length} circuit
                        {u.circuits.length === 1 ? '' : 's'}
                      </li>
                    ))}
                  </ul>
                </dd>
              </div>
              {v.workOrder.requiredCertification && (
                <div>
                  <dt className="text-slate">Certification needed</dt>
                  <dd>EPA 608 {epa608Labels[v.workOrder.requiredCertification]}</dd>
                </div>
              )}
            </dl>
          </Card>
          {v.events.length > 0 && (
            <Card title="Timeline">
              <ol className="flex flex-col gap-1 text-sm">
                {v.events.map((e, i) => (
                  <li key={i} className="tabular-nums">
                    {formatInZone(e.at, tz, timelineSpansDays ? 'EEE d MMM, HH:mm' : 'HH:mm')} ·{' '}
                    {visitStatusLabels[e.state as keyof typeof visitStatusLabels] ?? e.state}
                  </li>
                ))}
              </ol>
            </Card>
          )}
        </div>
        <div className="flex flex-col gap-4 lg:col-start-1 lg:row-start-1">
          <ReadingsSection visit={v} draft={draft} update={update} />
          <FindingsSection visit={v} draft={draft} update={update} />
          <RefrigerantSection visit={v} draft={draft} update={update} />
          <AttachmentsSection visit={v} />
          <div id="close-out">
            <CloseSection visit={v} unsaved={hasUnsaved(draft)} />
          </div>
        </div>
      </div>
    </>
  );
}

export default function VisitPage() {
  const { id } = useParams();
  return id ? <VisitScreen key={id} id={id} /> : <CurrentVisit />;
}
