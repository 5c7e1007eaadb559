import { useCallback, useMemo, useState } from 'react';
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { Building2, CheckCircle2, Clock, MailPlus, Pencil, RotateCw, UserCheck, UserX, XCircle } from 'lucide-react';
import { psiToKpa } from '@coilpath/calc';
import { epa608Labels, roleLabels } from '@coilpath/contract/vocabulary';
import { formatElevation } from '@coilpath/contract/measure';
import type { BranchDetail, InvitationRow, Page, UserRow } from '@coilpath/contract';
import { api, errorMessage } from '@/lib/api-client';
import { formatInZone, formatMoney, todayInZone } from '@/lib/format';
import { useListParams } from '@/lib/use-list-params';
import { useBranch } from '@/lib/branch';
import { useUser } from '@/lib/session';
import { Button } from '@/components/ui/button';
import { DataTable, type CoilpathColumn } from '@/components/ui/data-table';
import { Dialog } from '@/components/ui/dialog';
import { useNotify } from '@/components/ui/notices';
import { Badge, Card, PageHeader } from '@/components/ui/page';
import { Pager } from '@/components/ui/pager';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { SearchBox } from '@/components/search-box';
import { BranchForm, PersonForm } from './forms';

type Tab = 'people' | 'invitations' | 'branches';

const techSwatch = ['bg-tech-0', 'bg-tech-1', 'bg-tech-2', 'bg-tech-3', 'bg-tech-4', 'bg-tech-5', 'bg-tech-6', 'bg-tech-7'];

function invitationBadge(s: InvitationRow['status']) {
  switch (s) {
    case 'pending':
      return (
        <Badge tone="info">
          <Clock className="size-3" aria-hidden="true" /> Waiting
        </Badge>
      );
    case 'used':
      return (
        <Badge tone="ok">
          <CheckCircle2 className="size-3" aria-hidden="true" /> Joined
        </Badge>
      );
    case 'expired':
      return (
        <Badge tone="watch">
          <Clock className="size-3" aria-hidden="true" /> Expired
        </Badge>
      );
    case 'revoked':
      return (
        <Badge>
          <XCircle className="size-3" aria-hidden="true" /> Withdrawn
        </Badge>
      );
  }
}

export default function TeamPage() {
  const me = useUser();
  const { branchId, branch, timeZone } = useBranch();
  const notify = useNotify();
  const qc = useQueryClient();
  const list = useListParams({ sort: 'name', pageSize: 50 });
  const tab: Tab = (['invitations', 'branches'] as const).find((t) => t === list.searchParams.get('tab')) ?? 'people';
  const [dialog, setDialog] = useState<
    { kind: 'invite' } | { kind: 'person'; person: UserRow } | { kind: 'branch'; branch?: BranchDetail } | null
  >(null);
  const where = branch ? branch.name : 'all branches';
  const status = (['inactive', 'all'] as const).find((s) => s === list.params.status) ?? 'active';

  const people = useQuery({
    queryKey: ['users', { ...list.params, status, branchId }],
    queryFn: () =>
      api.get<Page<UserRow>>(
        '/api/users',
        {
          page: list.params.page,
          pageSize: list.params.pageSize,
          sort: list.params.sort,
          dir: list.params.dir,
          q: list.params.q || undefined,
          status,
          branchId,
        },
        { check: 'userPageSchema' },
      ),
    placeholderData: keepPreviousData,
    enabled: tab === 'people',
  });
  // The same list as the branch switcher's, read with every setting (the API answers them all).
  const branchSettings = useQuery({
    queryKey: ['branches', 'settings'],
    queryFn: () =>
      api.get<{ branches: BranchDetail[] }>('/api/branches', undefined, { check: 'branchListAnswerSchema' }).then((r) => r.branches),
    enabled: tab === 'branches',
  });
  const invitations = useQuery({
    queryKey: ['invitations'],
    queryFn: () =>
      api
        .get<{ invitations: InvitationRow[] }>('/api/invitations', undefined, { check: 'invitationListAnswerSchema' })
        .then((r) => r.invitations),
    enabled: tab === 'invitations',
  });

  const act = useMutation({
    mutationFn: ({ path, method }: { path: string; method: 'post' | 'delete' }) => {
      // Every action answers the row it changed: a person (deactivate, reactivate) or an invitation (resend, withdraw).
      const check = path.startsWith('/api/users/') ? ('userRowSchema' as const) : ('invitationRowSchema' as const);
      return method === 'post' ? api.post<unknown>(path, undefined, { check }) : api.delete<unknown>(path, { check });
    },
    onSuccess: () => Promise.all([qc.invalidateQueries({ queryKey: ['users'] }), qc.invalidateQueries({ queryKey: ['invitations'] })]),
  });
  const { mutateAsync } = act;
  const run = useCallback(
    async (path: string, method: 'post' | 'delete', done: string, confirm?: string) => {
      if (confirm && !window.confirm(confirm)) return;
      try {
        await mutateAsync({ path, method });
        notify(done);
      } catch (e) {
        notify(errorMessage(e), 'alarm');
      }
    },
    [mutateAsync, notify],
  );

  const peopleColumns = useMemo<CoilpathColumn<UserRow>[]>(
    () => [
      {
        accessorKey: 'name',
        header: 'Name',
        cell: ({ row }) => (
          <div className="flex items-start gap-2">
            {row.original.role === 'technician' && (
              <span
                className={`mt-1 inline-block size-3 shrink-0 rounded-full ${techSwatch[row.original.colorIndex % 8]}`}
                title={`Roster colour ${row.original.colorIndex + 1}`}
                aria-hidden="true"
              />
            )}
            <div>
              <div className="font-medium">
                {row.original.name}
                {!row.original.active && (
                  <Badge className="ml-2">
                    <UserX className="size-3" aria-hidden="true" /> Deactivated
                  </Badge>
                )}
              </div>
              <div className="text-xs text-slate">{row.original.email}</div>
            </div>
          </div>
        ),
      },
      { accessorKey: 'role', header: 'Role', cell: ({ row }) => roleLabels[row.original.role] },
      ...(branchId
        ? []
        : [
            {
              accessorKey: 'branchName',
              header: 'Branch',
              cell: ({ row }) => row.original.branchName ?? 'Every branch',
            } as CoilpathColumn<UserRow>,
          ]),
      {
        id: 'epa',
        header: 'EPA 608',
        enableSorting: false,
        cell: ({ row }) =>
          row.original.epa608Type === 'none' ? (
            <span className="text-slate">Not certified</span>
          ) : (
            <span>
              {epa608Labels[row.original.epa608Type]} <span className="text-xs text-slate">{row.original.epa608Number}</span>
            </span>
          ),
      },
      { id: 'skills', header: 'Skills', enableSorting: false, cell: ({ row }) => row.original.skills.join(', ') || '—' },
      {
        accessorKey: 'lastSignInAt',
        header: 'Last sign-in',
        cell: ({ row }) => (row.original.lastSignInAt ? formatInZone(row.original.lastSignInAt, timeZone, 'd MMM yyyy') : 'Never'),
      },
      {
        id: 'actions',
        header: () => <span className="sr-only">Actions</span>,
        enableSorting: false,
        cell: ({ row }) => {
          const p = row.original;
          return (
            <div className="flex justify-end gap-1">
              <Button variant="ghost" size="sm" aria-label={`Edit ${p.name}`} onClick={() => setDialog({ kind: 'person', person: p })}>
                <Pencil className="size-4" aria-hidden="true" />
              </Button>
              {p.id !== me.id &&
                (p.active ? (
                  <Button
                    variant="ghost"
                    size="sm"
                    onClick={() =>
                      run(
                        `/api/users/${p.id}/deactivate`,
                        'post',
                        `Deactivated ${p.name}: signed out everywhere; their history stays.`,
                        `Deactivate ${p.name}? They are signed out at once and can no longer sign in. Their visits and records stay.`,
                      )
                    }
                  >
                    <UserX className="size-4" aria-hidden="true" /> Deactivate
                  </Button>
                ) : (
                  <Button
                    variant="ghost"
                    size="sm"
                    onClick={() => run(`/api/users/${p.id}/reactivate`, 'post', `${p.name} can sign in again.`)}
                  >
                    <UserCheck className="size-4" aria-hidden="true" /> Reactivate
                  </Button>
                ))}
            </div>
          );
        },
      },
    ],
    [branchId, timeZone, me.id, run],
  );

  const tabButton = (t: Tab, label: string) => (
    <button
      type="button"
      role="tab"
      aria-selected={tab === t}
      onClick={() => list.set({ tab: t === 'people' ? undefined : t, q: undefined, sort: undefined, dir: undefined, status: undefined })}
      className={`min-h-11 border-b-2 px-4 text-sm font-medium ${tab === t ? 'border-copper text-ink' : 'border-transparent text-slate hover:text-ink'}`}
    >
      {label}
    </button>
  );

  return (
    <>
      <PageHeader
        title="Team"
        subtitle={`People, roles, certifications and working hours, and each branch’s settings — ${where}.`}
        actions={
          <>
            <Button variant="secondary" onClick={() => setDialog({ kind: 'branch' })}>
              <Building2 className="size-4" aria-hidden="true" /> Add branch
            </Button>
            <Button onClick={() => setDialog({ kind: 'invite' })}>
              <MailPlus className="size-4" aria-hidden="true" /> Invite someone
            </Button>
          </>
        }
      />
      <div role="tablist" aria-label="Team sections" className="mb-4 flex overflow-x-auto border-b border-slate-line">
        {tabButton('people', 'People')}
        {tabButton('invitations', 'Invitations')}
        {tabButton('branches', 'Branches')}
      </div>

      {tab === 'people' && (
        <>
          <div className="mb-3 flex flex-wrap items-center gap-3">
            <SearchBox value={list.params.q} onCommit={(text) => list.set({ q: text })} label="Search name or e-mail" />
            <label className="flex items-center gap-2 text-sm">
              <span className="text-slate">Show</span>
              <select
                className="min-h-11 rounded-md border border-slate-line bg-white px-2"
                value={status}
                onChange={(e) => list.set({ status: e.target.value === 'active' ? undefined : e.target.value })}
              >
                <option value="active">Active</option>
                <option value="inactive">Deactivated</option>
                <option value="all">All</option>
              </select>
            </label>
          </div>
          {people.isPending ? (
            <LoadingState label="Loading people…" />
          ) : people.isError ? (
            <ErrorState error={people.error} onRetry={() => people.refetch()} />
          ) : (
            <DataTable
              caption={`People in ${where}`}
              columns={peopleColumns}
              data={people.data.rows}
              getRowId={(r) => r.id}
              sorting={list.sorting}
              onSortingChange={list.onSortingChange}
              empty={
                list.params.q || status !== 'active'
                  ? 'Nobody matches. Change the search or the filter.'
                  : 'Nobody in this branch yet. Use “Invite someone”: they join from the e-mailed link.'
              }
              footer={
                <Pager
                  page={list.params.page}
                  pageSize={list.params.pageSize}
                  total={people.data.total}
                  noun="people"
                  sizes={[50, 100, 200]}
                  onPage={(p) => list.set({ page: p })}
                  onPageSize={(n) => list.set({ pageSize: n })}
                />
              }
            />
          )}
        </>
      )}

      {tab === 'invitations' &&
        (invitations.isPending ? (
          <LoadingState label="Loading invitations…" />
        ) : invitations.isError ? (
          <ErrorState error={invitations.error} onRetry={() => invitations.refetch()} />
        ) : invitations.data.length === 0 ? (
          <EmptyState title="No invitations yet" action={<Button onClick={() => setDialog({ kind: 'invite' })}>Invite someone</Button>}>
            Invitations you send appear here until the person joins. Each link works once and expires after 72 hours.
          </EmptyState>
        ) : (
          <ul className="flex flex-col gap-2">
            {invitations.data.map((i) => (
              <li key={i.id}>
                <Card>
                  <div className="flex flex-wrap items-center justify-between gap-3">
                    <div>
                      <div className="font-medium">
                        {i.name} <span className="text-sm font-normal text-slate">{i.email}</span>
                      </div>
                      <div className="mt-1 flex flex-wrap items-center gap-2 text-sm text-slate">
                        {invitationBadge(i.status)}
                        <span>
                          {roleLabels[i.role]}
                          {i.branchName ? ` · ${i.branchName}` : ''} · sent {formatInZone(i.createdAt, timeZone)}
                          {i.invitedByName ? ` by ${i.invitedByName}` : ''}
                          {i.status === 'pending' ? ` · expires ${formatInZone(i.expiresAt, timeZone)}` : ''}
                        </span>
                      </div>
                    </div>
                    {i.status !== 'used' && (
                      <div className="flex gap-1">
                        <Button
                          variant="secondary"
                          size="sm"
                          onClick={() =>
                            run(`/api/invitations/${i.id}/resend`, 'post', `Sent a new link to ${i.email}; the old one no longer works.`)
                          }
                        >
                          <RotateCw className="size-4" aria-hidden="true" /> Send new link
                        </Button>
                        {i.status === 'pending' && (
                          <Button
                            variant="ghost"
                            size="sm"
                            onClick={() => run(`/api/invitations/${i.id}`, 'delete', `Withdrew the invitation to ${i.email}.`)}
                          >
                            <XCircle className="size-4" aria-hidden="true" /> Withdraw
                          </Button>
                        )}
                      </div>
                    )}
                  </div>
                </Card>
              </li>
            ))}
          </ul>
        ))}

      {tab === 'branches' &&
        (branchSettings.isPending ? (
          <LoadingState label="Loading branches…" />
        ) : branchSettings.isError ? (
          <ErrorState error={branchSettings.error} onRetry={() => branchSettings.refetch()} />
        ) : branchSettings.data.length === 0 ? (
          <EmptyState title="No branches yet" action={<Button onClick={() => setDialog({ kind: 'branch' })}>Add branch</Button>}>
            Each branch has its own time zone, base, holidays and thresholds.
          </EmptyState>
        ) : (
          <div className="grid gap-3 md:grid-cols-2 xl:grid-cols-3">
            {branchSettings.data.map((b) => (
              <Card
                key={b.id}
                title={
                  <span>
                    {b.name} <span className="text-sm font-normal text-slate">{b.code}</span>
                  </span>
                }
                actions={
                  <Button variant="ghost" size="sm" onClick={() => setDialog({ kind: 'branch', branch: b })}>
                    <Pencil className="size-4" aria-hidden="true" /> Edit
                  </Button>
                }
              >
                <dl className="grid grid-cols-2 gap-x-3 gap-y-2 text-sm">
                  <dt className="text-slate">Time zone</dt>
                  <dd>{b.timeZone}</dd>
                  <dt className="text-slate">Base</dt>
                  <dd>{b.baseAddress || `${b.baseLat.toFixed(3)}, ${b.baseLon.toFixed(3)}`}</dd>
                  <dt className="text-slate">Labour rate</dt>
                  <dd className="tabular">{formatMoney(Math.round(b.labourRate * 100), b.currency)} / h</dd>
                  <dt className="text-slate">Readings in</dt>
                  <dd>{b.unitSystem === 'si' ? 'kPa(g) and °C' : 'psig and °F'}</dd>
                  <dt className="text-slate">Elevation</dt>
                  <dd className="tabular">{formatElevation(b.elevationMeters ?? 0, b.unitSystem)}</dd>
                  <dt className="text-slate">Sensor check</dt>
                  <dd className="tabular">
                    ±{b.sensorTolerancePercent} % or ±{b.sensorToleranceAbsolute} psi
                    {b.unitSystem === 'si' ? ` (${(Math.round(psiToKpa(b.sensorToleranceAbsolute) * 10) / 10).toFixed(1)} kPa)` : ''}
                  </dd>
                  <dt className="text-slate">Repeat alarm</dt>
                  <dd className="tabular">
                    {b.repeatAlarmCount}× in {b.repeatAlarmDays} days
                  </dd>
                  <dt className="text-slate">Callback window</dt>
                  <dd className="tabular">{b.callbackWindowDays} days</dd>
                  <dt className="text-slate">Model-alert inspections due</dt>
                  <dd className="tabular">within {b.inspectionDueDays} days</dd>
                  <dt className="text-slate">On summaries</dt>
                  <dd>
                    {b.tradingName || b.name}
                    {b.licenceNumber ? `, licence ${b.licenceNumber}` : ''}
                    {b.officeEmail ? (
                      <span className="block text-xs text-slate">Replies to {b.officeEmail}</span>
                    ) : (
                      <span className="block text-xs text-slate">No office e-mail: replies go to the sending address</span>
                    )}
                  </dd>
                  <dt className="text-slate">Holidays</dt>
                  <dd>
                    {b.holidays.length
                      ? `${b.holidays.length} (next ${b.holidays.find((d) => d >= todayInZone(b.timeZone)) ?? '—'})`
                      : 'None'}
                  </dd>
                </dl>
              </Card>
            ))}
          </div>
        ))}

      <Dialog
        open={dialog?.kind === 'invite' || dialog?.kind === 'person'}
        onClose={() => setDialog(null)}
        title={dialog?.kind === 'person' ? `Edit ${dialog.person.name}` : 'Invite someone'}
        description={
          dialog?.kind === 'invite'
            ? 'They receive a link by e-mail that works once, within 72 hours, to choose a password and join.'
            : 'A change of role or branch signs the person out, so they see the right screens at their next sign-in.'
        }
        wide
      >
        {dialog?.kind === 'invite' && <PersonForm onDone={() => setDialog(null)} />}
        {dialog?.kind === 'person' && <PersonForm person={dialog.person} onDone={() => setDialog(null)} />}
      </Dialog>
      <Dialog
        open={dialog?.kind === 'branch'}
        onClose={() => setDialog(null)}
        title={dialog?.kind === 'branch' && dialog.branch ? `Edit ${dialog.branch.name}` : 'Add branch'}
        wide
      >
        {dialog?.kind === 'branch' && <BranchForm branch={dialog.branch} onDone={() => setDialog(null)} />}
      </Dialog>
    </>
  );
}
