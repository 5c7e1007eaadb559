import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { Link } from 'react-router-dom';
import { causeCodeLabels, warrantyClaimStatuses, workOrderKindLabels } from '@coilpath/contract/vocabulary';
import { warrantyClaimUpdateSchema } from '@coilpath/contract/fix-quality';
import type { FactoryDefectCase, FactoryDefectModel, WarrantyClaimStatus, WarrantyClaimUpdate } from '@coilpath/contract';
import { DataTable, type CoilpathColumn, type CoilpathFeatures } from '@/components/ui/data-table';
import { Badge, Card } from '@/components/ui/page';
import { Button } from '@/components/ui/button';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { formatInZone, formatMoney, formatNumber } from '@/lib/format';
import { DefectCostChart } from './charts';
import { CsvLink } from './group-table';
import { csvUrl, defectsQuery, fixQualityKeys, updateClaim, type PeriodQuery } from './fix-quality-api';

export const claimStatusLabels: Record<WarrantyClaimStatus, string> = {
  to_claim: 'To claim',
  claimed: 'Claimed',
  paid: 'Paid',
  denied: 'Denied',
};
const claimTone = { to_claim: 'watch', claimed: 'info', paid: 'ok', denied: 'alarm' } as const;

const mcol = createColumnHelper<CoilpathFeatures, FactoryDefectModel>();
const modelColumns = [
  mcol.accessor((m) => `${m.make} ${m.model}`, {
    id: 'model',
    header: 'Make and model',
    cell: (c) => <span className="font-medium">{c.getValue()}</span>,
  }),
  mcol.accessor('cases', {
    header: 'Cases',
    cell: (c) =>
      `${c.getValue()} (${c.row.original.callbacks} callbacks, ${c.row.original.returnVisits} return visits, ${c.row.original.firstVisits} first visits)`,
  }),
  mcol.accessor('unitsAffected', { header: 'Units' }),
  mcol.accessor('sitesAffected', { header: 'Sites' }),
  mcol.accessor('labourHours', { header: 'Labour', cell: (c) => `${formatNumber(c.getValue(), 1)} h` }),
  mcol.accessor('refrigerantLb', { header: 'Refrigerant', cell: (c) => `${formatNumber(c.getValue(), 1)} lb` }),
  mcol.accessor('costCents', { header: 'Cost', cell: (c) => formatMoney(c.getValue()) }),
  mcol.accessor('toClaimCents', { header: 'To claim', cell: (c) => formatMoney(c.getValue()) }),
  mcol.accessor('claimedCents', { header: 'Claimed', cell: (c) => formatMoney(c.getValue()) }),
  mcol.accessor('paidCents', { header: 'Paid', cell: (c) => formatMoney(c.getValue()) }),
] as CoilpathColumn<FactoryDefectModel>[];

/** Inline editor of one case's warranty claim (same zod schema as the API). */
function ClaimEditor({ c, queryKey }: { c: FactoryDefectCase; queryKey: readonly unknown[] }) {
  const notify = useNotify();
  const qc = useQueryClient();
  const form = useForm<WarrantyClaimUpdate>({
    resolver: zodResolver(warrantyClaimUpdateSchema),
    // The amount field keeps its DOM default (dollars); setValueAs turns it into cents.
    defaultValues: { status: c.claim.status, reference: c.claim.reference ?? '' },
  });
  const m = useMutation({
    mutationFn: (body: WarrantyClaimUpdate) => updateClaim(c.workOrderId, body),
    onSuccess: (claim) => {
      notify(
        `Warranty claim for WO-${c.number} is now “${claimStatusLabels[claim.status]}”${claim.amountCents !== null ? ` at ${formatMoney(claim.amountCents, c.currency)}` : ''}.`,
      );
      void qc.invalidateQueries({ queryKey });
    },
    onError: (e) => notify(`The claim was not saved: ${errorMessage(e)}`, 'alarm'),
  });
  const err = form.formState.errors;
  const id = c.workOrderId.slice(0, 8);
  return (
    <form
      className="flex flex-wrap items-end gap-2"
      onSubmit={form.handleSubmit((v) => m.mutate(v))}
      aria-label={`Warranty claim for WO-${c.number}`}
    >
      <label className="flex flex-col text-xs text-slate" htmlFor={`st-${id}`}>
        Status
        <select
          id={`st-${id}`}
          className="min-h-9 rounded-md border border-slate-line bg-white px-2 text-sm text-ink"
          {...form.register('status')}
        >
          {warrantyClaimStatuses.map((s) => (
            <option key={s} value={s}>
              {claimStatusLabels[s]}
            </option>
          ))}
        </select>
      </label>
      <label className="flex flex-col text-xs text-slate" htmlFor={`am-${id}`}>
        Amount ({c.currency})
        <input
          id={`am-${id}`}
          inputMode="decimal"
          className="min-h-9 w-24 rounded-md border border-slate-line bg-white px-2 text-sm text-ink aria-[invalid=true]:border-alarm"
          aria-invalid={err.amountCents ? true : undefined}
          defaultValue={c.claim.amountCents !== null ? (c.claim.amountCents / 100).toFixed(2) : (c.costCents / 100).toFixed(2)}
          {...form.register('amountCents', {
            setValueAs: (v: string) => (v === '' || v === null ? null : Math.round(Number(String(v).replace(/[$,\s]/g, '')) * 100)),
          })}
        />
      </label>
      <label className="flex flex-col text-xs text-slate" htmlFor={`rf-${id}`}>
        Claim reference
        <input
          id={`rf-${id}`}
          className="min-h-9 w-32 rounded-md border border-slate-line bg-white px-2 text-sm text-ink"
          {...form.register('reference')}
        />
      </label>
      <Button type="submit" size="sm" variant="secondary" busy={m.isPending}>
        Save claim
      </Button>
      {(err.amountCents || err.reference) && (
        <p className="w-full text-xs text-alarm">{err.amountCents?.message ?? err.reference?.message}</p>
      )}
    </form>
  );
}

export function FactoryDefectReviewSection({ query, timeZone }: { query: PeriodQuery; timeZone: string }) {
  const q = useQuery(defectsQuery(query));
  const queryKey = fixQualityKeys.defects(query);
  const ccol = createColumnHelper<CoilpathFeatures, FactoryDefectCase>();
  const caseColumns = [
    ccol.accessor('openedAt', {
      header: 'Opened',
      cell: (c) => (
        <span className="whitespace-nowrap">
          {formatInZone(c.getValue(), timeZone, 'd MMM yyyy')}
          <br />
          <span className="text-xs text-slate">
            WO-{c.row.original.number} · {workOrderKindLabels[c.row.original.kind]}
          </span>
        </span>
      ),
    }),
    ccol.accessor((r) => `${r.make} ${r.model}`, {
      id: 'unit',
      header: 'Unit',
      cell: (c) => (
        <span>
          <Link className="font-medium text-coolant underline-offset-2 hover:underline" to={`/units/${c.row.original.unitId}`}>
            {c.row.original.unitTag}
          </Link>{' '}
          {c.getValue()}
          <br />
          <span className="text-xs text-slate">
            {c.row.original.siteName} · {c.row.original.branchName}
          </span>
        </span>
      ),
    }),
    ccol.accessor((r) => r.causeCodes.map((k) => causeCodeLabels[k]).join(', '), { id: 'cause', header: 'Cause' }),
    ccol.accessor('costCents', {
      header: 'Cost',
      cell: (c) => (
        <span className="whitespace-nowrap">
          {formatMoney(c.getValue(), c.row.original.currency)}
          <br />
          <span className="text-xs text-slate">
            {formatNumber(c.row.original.labourMinutes / 60, 1)} h · {formatNumber(c.row.original.refrigerantLb, 1)} lb
          </span>
        </span>
      ),
    }),
    ccol.accessor((r) => r.claim.status, {
      id: 'claim',
      header: 'Warranty claim',
      cell: (c) => (
        <div className="flex min-w-72 flex-col gap-1">
          <Badge tone={claimTone[c.row.original.claim.status]}>{claimStatusLabels[c.row.original.claim.status]}</Badge>
          {c.row.original.amountDifferenceCents !== null && c.row.original.amountDifferenceCents !== 0 && (
            <span className="text-xs text-slate">
              Claimed {formatMoney(Math.abs(c.row.original.amountDifferenceCents), c.row.original.currency)}{' '}
              {c.row.original.amountDifferenceCents > 0 ? 'more' : 'less'} than the computed cost
            </span>
          )}
          <ClaimEditor c={c.row.original} queryKey={queryKey} />
        </div>
      ),
    }),
  ] as CoilpathColumn<FactoryDefectCase>[];

  return (
    <Card title="Factory-defect review" actions={<CsvLink href={csvUrl(query, 'factoryDefects')} label="CSV" />}>
      <p className="mb-3 max-w-prose text-sm text-slate">
        Service calls (first visits included), callbacks and return visits opened in this period whose finding was a{' '}
        <strong>factory defect</strong>: the labour and refrigerant they cost at each branch’s rates (set on the Team screen) — the
        manufacturer’s to pay. Record each warranty claim as it moves from to claim to claimed, then paid or denied.
      </p>
      {q.isPending ? (
        <LoadingState label="Loading factory-defect cases…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      ) : q.data.cases.length === 0 ? (
        <EmptyState title="No factory defects in this period">
          When a technician records a finding with the origin “Factory defect” on a service call, callback or return visit, the case appears
          here with its cost.
        </EmptyState>
      ) : (
        <div className="flex flex-col gap-4">
          <DefectCostChart
            models={q.data.models.map((m) => ({
              label: `${m.make} ${m.model}`,
              labour: m.labourCostCents,
              refrigerant: m.refrigerantCostCents,
            }))}
          />
          <DataTable caption="Factory-defect cost by make and model" columns={modelColumns} data={q.data.models} getRowId={(m) => m.key} />
          <h3 className="text-sm font-semibold">Cases ({q.data.cases.length})</h3>
          <DataTable
            caption="Factory-defect cases and their warranty claims"
            columns={caseColumns}
            data={q.data.cases}
            getRowId={(c) => c.workOrderId}
          />
        </div>
      )}
    </Card>
  );
}
