import { useEffect, useState, type ReactNode } from 'react';
import { Link, useParams, useSearchParams } from 'react-router-dom';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { AlertTriangle, FileText, Printer, Search } from 'lucide-react';
import { recordDate } from '@coilpath/contract/date-words';
import {
  applianceCategoryLabels,
  causeCodeLabels,
  causeOriginLabels,
  leakCaseStatusLabels,
  unitKindLabels,
  visitOutcomeLabels,
  workOrderKindLabels,
  workOrderStateLabels,
} from '@coilpath/contract/vocabulary';
import { measureSymbol, readingUnitsBySystem, readingsElevationNote } from '@coilpath/contract/measure';
import type { UnitSearchResult } from '@coilpath/contract';
import { useBranch } from '@/lib/branch';
import { useUser } from '@/lib/session';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Badge, Card, PageHeader, SafetyNote } from '@/components/ui/page';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { api } from '@/lib/api-client';
import { formatInZone, formatNumber, viewerZoneDiffers, zoneAbbreviation } from '@/lib/format';
import { CircuitTrend } from './readings-chart';
import { ReadingsTable } from './readings-table';
import { UnitTable } from './unit-table';
import { RefrigerantRecordCard } from './refrigerant-record';
import { CircuitTargetsList } from './circuit-targets';
import { appNow } from '@/lib/now';
import { unitFileQuery } from '@/lib/visit-queries';

const unitSearchQuery = (q: string, branchId: string | undefined) =>
  queryOptions({
    queryKey: ['units', 'search', q, branchId],
    queryFn: () => api.get<UnitSearchResult>('/api/unit-file', { q, branchId }, { check: 'unitSearchResultSchema' }),
  });

export default function UnitPage() {
  const { id } = useParams();
  return id ? <UnitFileView id={id} /> : <UnitSearch />;
}

// ---------------------------------------------------------------------------------------------
// /units — search
// ---------------------------------------------------------------------------------------------

function UnitSearch() {
  const user = useUser();
  const { branchId, branch } = useBranch();
  const [params, setParams] = useSearchParams();
  const [text, setText] = useState(params.get('q') ?? '');
  const q = params.get('q') ?? '';
  useEffect(() => {
    const t = window.setTimeout(() => {
      if (text !== q) setParams(text ? { q: text } : {}, { replace: true });
    }, 300);
    return () => window.clearTimeout(t);
  }, [text, q, setParams]);
  const r = useQuery(unitSearchQuery(q, branchId));
  const tech = user.role === 'technician';
  return (
    <>
      <PageHeader
        title="Unit file"
        subtitle={
          tech
            ? 'The units on your visits and bookings. Open one to see its history before you go up on the roof.'
            : `Find a unit to see its circuits, alarms, readings, refrigerant log and work — ${branch?.name ?? 'all branches'}.`
        }
      />
      <form
        role="search"
        className="mb-4 max-w-xl"
        onSubmit={(e) => {
          e.preventDefault();
          setParams(text ? { q: text } : {}, { replace: true });
        }}
      >
        <TextField
          label="Search units"
          placeholder="Tag, serial, make, model or site"
          value={text}
          onChange={(e) => setText(e.target.value)}
          hint="Matches any part of the unit tag, serial number, make, model or site name."
          type="search"
        />
      </form>
      {r.isPending ? (
        <LoadingState label="Finding units…" />
      ) : r.isError ? (
        <ErrorState error={r.error} onRetry={() => r.refetch()} />
      ) : r.data.units.length === 0 ? (
        <EmptyState title={q ? `No unit matches “${q}”` : 'No units to show'}>
          {tech
            ? 'Units appear here once a visit or booking on them is assigned to you.'
            : 'Units are added on the Sites screen (one by one or by CSV import).'}
        </EmptyState>
      ) : (
        <>
          <ul className="grid gap-2 sm:grid-cols-2 xl:grid-cols-3">
            {r.data.units.map((u) => (
              <li key={u.id}>
                <Link
                  to={`/units/${u.id}`}
                  className="flex min-h-16 flex-col rounded-lg border border-slate-line bg-white p-3 hover:border-coolant focus-visible:border-coolant"
                >
                  <span className="flex items-center justify-between gap-2">
                    <span className="font-semibold">{u.tag}</span>
                    {u.openWorkOrders > 0 && <Badge tone="info">{u.openWorkOrders} open work</Badge>}
                  </span>
                  <span className="text-sm">
                    {u.make} {u.model} · {unitKindLabels[u.kind]}
                  </span>
                  <span className="text-xs text-slate">
                    {u.siteName} · {u.branchName} · S/N {u.serial}
                  </span>
                </Link>
              </li>
            ))}
          </ul>
          {r.data.more && <p className="mt-3 text-sm text-slate">More units match; narrow the search to see them.</p>}
        </>
      )}
    </>
  );
}

// ---------------------------------------------------------------------------------------------
// /units/:id — the file
// ---------------------------------------------------------------------------------------------

function Dl({ items }: { items: [string, ReactNode][] }) {
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
      {items.map(([k, v]) => (
        <div key={k} className="contents">
          <dt className="text-slate">{k}</dt>
          <dd className="tabular">{v ?? '—'}</dd>
        </div>
      ))}
    </dl>
  );
}

function UnitFileView({ id }: { id: string }) {
  const q = useQuery(unitFileQuery(id));
  const user = useUser();
  const [allAlarms, setAllAlarms] = useState(false);
  if (q.isPending) return <LoadingState label="Opening the unit file…" />;
  if (q.isError)
    return (
      <>
        <PageHeader title="Unit file" />
        <ErrorState error={q.error} onRetry={() => q.refetch()} title="This unit file could not be opened" />
        <p className="mt-3 text-sm">
          <Link className="text-coolant underline" to="/units">
            Search units
          </Link>
        </p>
      </>
    );
  const f = q.data;
  const tz = f.branch.timeZone;
  const at = (s: string | null, pattern?: string) => (s ? formatInZone(s, tz, pattern) : '—');
  const zoneNote = viewerZoneDiffers(tz) ? ` Times in ${f.branch.name}’s time zone (${zoneAbbreviation(appNow(), tz)}).` : '';
  const units = readingUnitsBySystem[f.branch.unitSystem];
  const circuitsWithReadings = f.circuits.filter((c) => f.readings.some((r) => r.circuitId === c.id));
  const alarms = allAlarms ? f.alarms : f.alarms.slice(0, 15);
  const u = f.unit;

  return (
    <>
      <PageHeader
        title={`Unit file · ${u.tag}`}
        subtitle={
          <>
            {u.make} {u.model} at {f.site.name} ({f.site.customerName}) — {f.branch.name}.{zoneNote}
            {u.archivedAt && (
              <Badge tone="neutral" className="ml-2">
                Archived
              </Badge>
            )}
          </>
        }
        actions={
          <Button onClick={() => window.print()}>
            <Printer className="size-4" aria-hidden="true" /> Print unit file
          </Button>
        }
      />
      <div className="flex flex-col gap-5">
        <div className="grid grid-cols-1 gap-5 lg:grid-cols-3 [&>*]:min-w-0">
          <Card title="Identity" className="lg:col-span-2">
            <div className="flex flex-col gap-4 sm:flex-row">
              <div className="flex-1">
                <Dl
                  items={[
                    ['Kind', unitKindLabels[u.kind]],
                    ['Make and model', `${u.make} ${u.model}`],
                    ['Serial', u.serial],
                    ['Refrigerant', u.refrigerant || '—'],
                    ['Full charge', u.fullChargeLb ? `${formatNumber(u.fullChargeLb, 1)} lb` : '—'],
                    ['Leak-rule category', applianceCategoryLabels[u.applianceCategory]],
                    ['Capacity', u.tonnage ? `${formatNumber(u.tonnage, 1)} tons` : '—'],
                    ['Installed', u.installDate ?? '—'],
                    ['Warranty until', u.warrantyEnd ?? '—'],
                    ['Site', `${f.site.name}, ${f.site.address}${f.site.city ? `, ${f.site.city}` : ''}`],
                    ['Access', f.site.accessNotes ?? '—'],
                  ]}
                />
                {u.notes && <p className="mt-2 text-sm">{u.notes}</p>}
              </div>
              <figure className="sm:w-56">
                {f.nameplate && f.nameplate.contentType.startsWith('image/') ? (
                  <a href={f.nameplate.url} target="_blank" rel="noreferrer">
                    <img
                      src={f.nameplate.url}
                      alt={`Nameplate of ${u.tag}`}
                      className="w-full rounded-md border border-slate-line object-cover"
                      loading="lazy"
                    />
                  </a>
                ) : (
                  <div className="flex h-32 items-center justify-center rounded-md border border-dashed border-slate-line p-3 text-center text-xs text-slate">
                    No nameplate photo yet. A technician adds one from the Visit screen.
                  </div>
                )}
                <figcaption className="mt-1 text-xs text-slate">Nameplate</figcaption>
              </figure>
            </div>
          </Card>
          <Card title="Circuits and agreement">
            {f.circuits.length === 0 ? (
              <p className="mb-3 text-sm text-slate">No refrigerant circuits (e.g. a boiler).</p>
            ) : (
              <CircuitTargetsList file={f} canEdit={user.role !== 'technician'} />
            )}
            {f.agreements.length === 0 ? (
              <p className="text-sm text-slate">Not covered by a maintenance agreement.</p>
            ) : (
              <ul className="flex flex-col gap-1 text-sm">
                {f.agreements.map((a) => (
                  <li key={a.id}>
                    <span className="font-medium">{a.name}</span> <Badge tone={a.status === 'active' ? 'ok' : 'neutral'}>{a.status}</Badge>
                    <br />
                    <span className="text-xs text-slate">
                      {a.termStart} to {a.termEnd} · respond within {a.slaHours} h
                    </span>
                  </li>
                ))}
              </ul>
            )}
          </Card>
        </div>

        <Card title="Readings trend">
          <div className="mb-3">
            <SafetyNote>
              Readings guide diagnosis alongside the manufacturer’s charging data, local codes and licensed practice. Pressures are
              reference-gauge values in {measureSymbol('pressure', units)}; temperatures in {measureSymbol('temperature', units)}
              {units.temperature === 'C' ? ', superheat and subcooling in K' : ''} ({f.branch.name}’s unit setting). Refrigerant work needs
              the proper EPA 608 certification.
              {readingsElevationNote(f.readings, f.branch.unitSystem) && <> {readingsElevationNote(f.readings, f.branch.unitSystem)}</>}
            </SafetyNote>
          </div>
          {circuitsWithReadings.length === 0 ? (
            <EmptyState title="No readings yet">
              Readings recorded on visits (pressures and line temperatures per circuit) draw the trend here.
            </EmptyState>
          ) : (
            <div className="flex flex-col gap-5">
              {circuitsWithReadings.map((c) => (
                <section key={c.id} aria-label={`Circuit ${c.number}`}>
                  <h3 className="mb-2 text-sm font-semibold">
                    Circuit {c.number}{' '}
                    <span className="font-normal text-slate">({f.readings.filter((r) => r.circuitId === c.id).length} readings)</span>
                  </h3>
                  <CircuitTrend readings={f.readings.filter((r) => r.circuitId === c.id)} timeZone={tz} circuit={c.number} units={units} />
                  <ReadingsTable readings={f.readings.filter((r) => r.circuitId === c.id)} timeZone={tz} circuit={c.number} units={units} />
                </section>
              ))}
            </div>
          )}
        </Card>

        <div className="grid grid-cols-1 gap-5 xl:grid-cols-2 [&>*]:min-w-0">
          <Card title={`Alarm timeline (${f.alarms.length})`}>
            {f.alarms.length === 0 ? (
              <p className="text-sm text-slate">No alarms recorded for this unit.</p>
            ) : (
              <>
                <ol className="flex flex-col gap-2 border-l-2 border-slate-line pl-4">
                  {alarms.map((a) => (
                    <li key={a.id} className="relative text-sm">
                      <span className="absolute -left-[23px] top-1 size-3 rounded-full border-2 border-white bg-alarm" aria-hidden="true" />
                      <span className="font-medium">{a.code}</span>
                      {a.circuit !== null && <span> · circuit {a.circuit}</span>}
                      {a.description && <span className="text-slate"> · {a.description}</span>}
                      <br />
                      <span className="text-xs text-slate">
                        Raised {at(a.raisedAt)} · {a.clearedAt ? `cleared ${at(a.clearedAt)}` : 'not cleared'} · from {a.source}
                      </span>
                    </li>
                  ))}
                </ol>
                {f.alarms.length > 15 && (
                  <Button variant="ghost" size="sm" className="mt-2" onClick={() => setAllAlarms((x) => !x)} aria-expanded={allAlarms}>
                    {allAlarms ? 'Show the latest 15' : `Show all ${f.alarms.length}`}
                  </Button>
                )}
              </>
            )}
          </Card>

          <Card title={`Findings (${f.findings.length})`}>
            {f.findings.length === 0 ? (
              <p className="text-sm text-slate">No findings recorded yet.</p>
            ) : (
              <UnitTable caption="Findings" head={['Date', 'Cause', 'Origin', 'Alarm / circuit', 'By']}>
                {f.findings.map((x) => (
                  <tr key={x.id}>
                    <td className="whitespace-nowrap">
                      {at(x.createdAt, 'd MMM yyyy')}
                      <br />
                      <span className="text-xs text-slate">WO-{x.workOrderNumber}</span>
                    </td>
                    <td>
                      {causeCodeLabels[x.causeCode]}
                      {x.notes && <span className="block text-xs text-slate">{x.notes}</span>}
                    </td>
                    <td>
                      {x.origin === 'factory_defect' ? (
                        <Badge tone="alarm">{causeOriginLabels[x.origin]}</Badge>
                      ) : (
                        causeOriginLabels[x.origin]
                      )}
                    </td>
                    <td>
                      {x.alarmCode ?? '—'}
                      {x.reportedCircuit !== null && x.actualCircuit !== null && x.reportedCircuit !== x.actualCircuit ? (
                        <span className="block text-xs text-alarm">
                          <AlertTriangle className="inline size-3" aria-hidden="true" /> Controller reported circuit {x.reportedCircuit};
                          fault was on circuit {x.actualCircuit}
                        </span>
                      ) : x.actualCircuit !== null ? (
                        <span className="block text-xs text-slate">circuit {x.actualCircuit}</span>
                      ) : null}
                    </td>
                    <td>{x.techName ?? '—'}</td>
                  </tr>
                ))}
              </UnitTable>
            )}
          </Card>
        </div>

        <RefrigerantRecordCard unitId={u.id} />

        {f.leakCases.length > 0 && (
          <Card title="Leak cases (Watchlist)">
            <div>
              <ul className="flex flex-col gap-2">
                {f.leakCases.map((c) => (
                  <li key={c.id} className="rounded-md border border-slate-line p-3 text-sm">
                    <Badge tone={c.status === 'open' ? 'alarm' : 'ok'}>{leakCaseStatusLabels[c.status]}</Badge> Opened{' '}
                    {recordDate(c.openedOn)} at {formatNumber(c.leakRatePercent, 1)} %/yr ({c.method}) over {c.thresholdPercent} % under{' '}
                    {c.rule}. Repair due {recordDate(c.repairDueDate)}
                    {c.repairedOn ? `, repaired ${recordDate(c.repairedOn)}` : ''}
                    {c.chronic ? ' · chronic leaker' : ''}.
                    {c.verificationTests.length > 0 && (
                      <span className="block text-xs text-slate">
                        Verification:{' '}
                        {c.verificationTests
                          .map((t) => `${t.kind === 'initial' ? 'initial' : 'follow-up'} ${t.testedOn} ${t.passed ? 'passed' : 'failed'}`)
                          .join('; ')}
                      </span>
                    )}
                  </li>
                ))}
              </ul>
            </div>
          </Card>
        )}

        <Card title={`Work orders (${f.workOrders.length})`}>
          {f.workOrders.length === 0 ? (
            <p className="text-sm text-slate">No work on record for this unit.</p>
          ) : (
            <UnitTable caption="Every work order on this unit" head={['Work order', 'Opened', 'State', 'Visits', 'Complaint']}>
              {f.workOrders.map((w) => (
                <tr key={w.id}>
                  <td className="whitespace-nowrap">
                    <span className="font-medium">WO-{w.number}</span>
                    <br />
                    <span className="text-xs text-slate">{workOrderKindLabels[w.kind]}</span>
                  </td>
                  <td className="whitespace-nowrap">{at(w.createdAt, 'd MMM yyyy')}</td>
                  <td>
                    {workOrderStateLabels[w.state]}
                    {w.outcome && <span className="block text-xs text-slate">{visitOutcomeLabels[w.outcome]}</span>}
                  </td>
                  <td className="text-xs">
                    {w.visits.length === 0
                      ? '—'
                      : w.visits.map((v) => (
                          <span key={v.id} className="block">
                            <Link className="text-coolant hover:underline" to={`/visits/${v.id}`}>
                              {v.techName}
                            </Link>{' '}
                            {v.closedAt ? `closed ${at(v.closedAt, 'd MMM')}` : 'open'}
                            {v.outcome ? ` · ${visitOutcomeLabels[v.outcome]}` : ''}
                          </span>
                        ))}
                  </td>
                  <td className="max-w-md">
                    {w.complaint || '—'}
                    {w.purpose?.startsWith('model-alert:') && <span className="block text-xs text-alarm">Model-alert inspection</span>}
                  </td>
                </tr>
              ))}
            </UnitTable>
          )}
        </Card>

        <Card title={`Attachments (${f.attachments.length})`}>
          {f.attachments.length === 0 ? (
            <p className="text-sm text-slate">No photos or documents yet. Technicians add them on the Visit screen.</p>
          ) : (
            <ul className="grid grid-cols-2 gap-3 sm:grid-cols-4 lg:grid-cols-6">
              {f.attachments.map((a) => (
                <li key={a.id}>
                  <a
                    href={a.url}
                    {...(a.contentType.startsWith('image/') ? { target: '_blank', rel: 'noreferrer' } : { download: a.displayName })}
                    className="block rounded-md border border-slate-line p-1 hover:border-coolant"
                  >
                    {a.contentType.startsWith('image/') ? (
                      <img src={a.url} alt={a.displayName} loading="lazy" className="aspect-square w-full rounded object-cover" />
                    ) : (
                      <span className="flex aspect-square items-center justify-center">
                        <FileText className="size-8 text-slate" aria-hidden="true" />
                      </span>
                    )}
                    <span className="mt-1 block truncate text-xs">{a.displayName}</span>
                    <span className="block text-xs text-slate">
                      {a.kind} · {at(a.createdAt, 'd MMM yyyy')}
                    </span>
                  </a>
                </li>
              ))}
            </ul>
          )}
        </Card>
        <p className="text-sm">
          <Link className="inline-flex min-h-11 items-center gap-1 text-coolant underline" to="/units">
            <Search className="size-4" aria-hidden="true" /> Search other units
          </Link>
        </p>
      </div>
    </>
  );
}
