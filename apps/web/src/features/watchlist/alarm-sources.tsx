import { useMemo, useState } from 'react';
import { AlertTriangle, Copy, KeyRound, Plus, Power, RotateCcw } from 'lucide-react';
import { alarmDeliveryStatusLabels, alarmRejectionReasonLabels } from '@coilpath/contract/vocabulary';
import type { AlarmDeliveryRow, AlarmRejectionReason, AlarmSourceRow, AlarmSourceSecret } from '@coilpath/contract';
import { errorMessage } from '@/lib/api-client';
import { formatInZone } from '@/lib/format';
import { Badge } from '@/components/ui/page';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { useNotify } from '@/components/ui/notices';
import { useAlarmSources, useCreateAlarmSource, useMapDelivery, usePatchAlarmSource, useRotateAlarmSource } from './api';
import { useUnitChoices } from '@/lib/unit-choices';

const reasonLabel = (d: AlarmDeliveryRow) =>
  d.reason === 'unknown_unit'
    ? 'No unit with this tag at the site'
    : d.reason === 'ambiguous_unit'
      ? 'Several units carry this tag'
      : d.reason
        ? alarmRejectionReasonLabels[d.reason as AlarmRejectionReason]
        : alarmDeliveryStatusLabels[d.status];

/** The secret of a new or rotated source, shown once, with a copy button. */
function SecretOnce({ shown, timeZone, onClose }: { shown: AlarmSourceSecret & { name: string }; timeZone: string; onClose: () => void }) {
  const notify = useNotify();
  const copy = () =>
    navigator.clipboard.writeText(shown.secret).then(
      () => notify('The secret is on the clipboard.'),
      () => notify('The browser did not allow copying; select the secret and copy it by hand.', 'alarm'),
    );
  return (
    <div role="alert" className="flex flex-col gap-2 rounded-md border border-watch-base/40 bg-watch-tint p-3 text-sm">
      <p className="font-semibold">
        <KeyRound className="mr-1 inline size-4" aria-hidden="true" />
        Secret of “{shown.name}” — shown this once. Copy it into the controller now: Coilpath cannot show it again.
      </p>
      {shown.previousValidUntil && (
        <p>
          The previous secret is accepted until {formatInZone(shown.previousValidUntil, timeZone)}; change the controller over before then.
        </p>
      )}
      <div className="flex flex-wrap items-center gap-2">
        <code className="break-all rounded bg-white px-2 py-1 font-mono text-sm" aria-label="Secret">
          {shown.secret}
        </code>
        <Button size="sm" variant="secondary" onClick={copy}>
          <Copy className="size-4" aria-hidden="true" /> Copy
        </Button>
      </div>
      <p className="text-xs">
        Source id (the end of the URL the controller posts to): <code className="font-mono">{shown.id}</code>. The README's “Alarm sources”
        shows the signed request.
      </p>
      <div>
        <Button size="sm" onClick={onClose}>
          I have copied it
        </Button>
      </div>
    </div>
  );
}

function MapForm({ d, siteId, branchId }: { d: AlarmDeliveryRow; siteId: string; branchId: string | undefined }) {
  const notify = useNotify();
  const units = useUnitChoices(branchId);
  const m = useMapDelivery();
  const choices = (units.data ?? []).filter((u) => u.siteId === siteId);
  const [unitId, setUnitId] = useState('');
  if (units.isError) return <span className="text-xs text-alarm">The units could not be loaded.</span>;
  return (
    <form
      className="flex flex-wrap items-end gap-2"
      aria-label={`Map delivery ${d.deliveryId ?? ''} to a unit`}
      onSubmit={(e) => {
        e.preventDefault();
        if (!unitId) return notify('Choose the unit this alarm belongs to.', 'alarm');
        m.mutate(
          { id: d.id, unitId },
          {
            onSuccess: () => notify(`Alarm ${d.code ?? ''} is now recorded on ${choices.find((u) => u.id === unitId)?.tag ?? 'the unit'}.`),
            onError: (err) => notify(errorMessage(err), 'alarm'),
          },
        );
      }}
    >
      <SelectField label="Unit at this site" value={unitId} onChange={(e) => setUnitId(e.target.value)} disabled={units.isPending}>
        <option value="">{units.isPending ? 'Loading units…' : choices.length ? 'Choose a unit' : 'No units at this site'}</option>
        {choices.map((u) => (
          <option key={u.id} value={u.id}>
            {u.tag} — {u.make} {u.model}
          </option>
        ))}
      </SelectField>
      <Button type="submit" size="sm" busy={m.isPending}>
        Map
      </Button>
    </form>
  );
}

function SourceCard({
  s,
  timeZone,
  branchId,
  onSecret,
}: {
  s: AlarmSourceRow;
  timeZone: string;
  branchId: string | undefined;
  onSecret: (x: AlarmSourceSecret & { name: string }) => void;
}) {
  const notify = useNotify();
  const rotate = useRotateAlarmSource();
  const patch = usePatchAlarmSource();
  return (
    <li className="flex flex-col gap-2 rounded-md border border-slate-line bg-white p-3">
      <div className="flex flex-wrap items-start justify-between gap-2">
        <div>
          <p className="font-medium">
            {s.name} <span className="text-slate">· {s.siteName}</span>
          </p>
          <p className="text-xs text-slate">
            Source id <code className="font-mono">{s.id}</code>
          </p>
        </div>
        <div className="flex flex-wrap gap-2">
          {s.enabled ? <Badge tone="ok">Enabled</Badge> : <Badge tone="alarm">Disabled</Badge>}
          {s.unmatched.length > 0 && (
            <Badge tone="watch">
              <AlertTriangle className="size-3.5" aria-hidden="true" /> {s.unmatched.length} to map
            </Badge>
          )}
        </div>
      </div>
      <dl className="grid grid-cols-1 gap-x-4 gap-y-1 text-sm sm:grid-cols-3">
        <div>
          <dt className="text-xs text-slate">Last delivery</dt>
          <dd>{s.lastDeliveryAt ? formatInZone(s.lastDeliveryAt, timeZone) : 'None yet'}</dd>
        </div>
        <div>
          <dt className="text-xs text-slate">Deliveries today</dt>
          <dd>{s.deliveriesToday}</dd>
        </div>
        <div>
          <dt className="text-xs text-slate">Rejected today</dt>
          <dd className={s.rejectedToday ? 'text-alarm' : ''}>{s.rejectedToday}</dd>
        </div>
      </dl>
      {s.previousValidUntil && (
        <p className="text-xs text-slate">
          After the last rotation the previous secret is accepted until {formatInZone(s.previousValidUntil, timeZone)}.
        </p>
      )}
      {s.recentRejected.length > 0 && (
        <div className="text-sm">
          <p className="text-xs font-medium text-slate">Latest rejected requests</p>
          <ul className="flex flex-col gap-0.5">
            {s.recentRejected.map((d) => (
              <li key={d.id}>
                {formatInZone(d.receivedAt, timeZone)} — {reasonLabel(d)}
              </li>
            ))}
          </ul>
        </div>
      )}
      {s.unmatched.length > 0 && (
        <div className="flex flex-col gap-2 text-sm">
          <p className="text-xs font-medium text-slate">Alarms whose unit tag matched no unit: map each to a unit of {s.siteName}</p>
          <ul className="flex flex-col gap-3">
            {s.unmatched.map((d) => (
              <li key={d.id} className="flex flex-col gap-1 border-t border-slate-line pt-2">
                <span>
                  Tag <strong className="font-mono">{d.unitTag}</strong>, alarm <span className="font-mono">{d.code}</span>
                  {d.circuit ? `, circuit ${d.circuit}` : ''}, raised {d.raisedAt ? formatInZone(d.raisedAt, timeZone) : '—'} (
                  {reasonLabel(d)})
                </span>
                <MapForm d={d} siteId={s.siteId} branchId={branchId} />
              </li>
            ))}
          </ul>
        </div>
      )}
      <div className="flex flex-wrap gap-2">
        <Button
          size="sm"
          variant="secondary"
          busy={rotate.isPending}
          onClick={() =>
            rotate.mutate(s.id, {
              onSuccess: (r) => {
                onSecret({ ...r, name: s.name });
                notify(`A new secret for ${s.name}: the old one stays valid for 24 hours.`);
              },
              onError: (err) => notify(errorMessage(err), 'alarm'),
            })
          }
        >
          <RotateCcw className="size-4" aria-hidden="true" /> Rotate secret
        </Button>
        <Button
          size="sm"
          variant="secondary"
          busy={patch.isPending}
          onClick={() =>
            patch.mutate(
              { id: s.id, patch: { enabled: !s.enabled } },
              {
                onSuccess: () =>
                  notify(s.enabled ? `${s.name} is disabled: its alarms are refused until it is enabled.` : `${s.name} is enabled again.`),
                onError: (err) => notify(errorMessage(err), 'alarm'),
              },
            )
          }
        >
          <Power className="size-4" aria-hidden="true" /> {s.enabled ? 'Disable' : 'Enable'}
        </Button>
      </div>
    </li>
  );
}

function CreateSource({
  branchId,
  onSecret,
}: {
  branchId: string | undefined;
  onSecret: (x: AlarmSourceSecret & { name: string }) => void;
}) {
  const notify = useNotify();
  const units = useUnitChoices(branchId);
  const m = useCreateAlarmSource();
  const sites = useMemo(
    () => [...new Map((units.data ?? []).map((u) => [u.siteId, u.siteName])).entries()].sort((a, b) => a[1].localeCompare(b[1])),
    [units.data],
  );
  const [siteId, setSiteId] = useState('');
  const [name, setName] = useState('');
  return (
    <form
      className="flex flex-wrap items-end gap-3 rounded-md border border-slate-line bg-white p-3"
      aria-label="Register an alarm source"
      onSubmit={(e) => {
        e.preventDefault();
        if (!siteId || !name.trim()) return notify('Choose the site and name the controller.', 'alarm');
        m.mutate(
          { siteId, name },
          {
            onSuccess: (r) => {
              onSecret({ ...r, name: name.trim() });
              setName('');
              notify(`Alarm source “${name.trim()}” registered: copy its secret now.`);
            },
            onError: (err) => notify(errorMessage(err), 'alarm'),
          },
        );
      }}
    >
      <SelectField
        label="Site"
        value={siteId}
        onChange={(e) => setSiteId(e.target.value)}
        disabled={units.isPending}
        error={units.isError ? 'The sites could not be loaded.' : undefined}
      >
        <option value="">{units.isPending ? 'Loading sites…' : 'Choose a site'}</option>
        {sites.map(([id, n]) => (
          <option key={id} value={id}>
            {n}
          </option>
        ))}
      </SelectField>
      <TextField label="Controller name" value={name} onChange={(e) => setName(e.target.value)} placeholder="Roof BMS" maxLength={120} />
      <Button type="submit" busy={m.isPending}>
        <Plus className="size-4" aria-hidden="true" /> Register
      </Button>
    </form>
  );
}

/** Building controllers that post signed alarms: their health, their secrets, and alarms to map to a unit. */
export function AlarmSourcesSection({ branchId, timeZone }: { branchId: string | undefined; timeZone: string }) {
  const q = useAlarmSources(branchId);
  const [adding, setAdding] = useState(false);
  const [secret, setSecret] = useState<(AlarmSourceSecret & { name: string }) | null>(null);
  const rows = q.data ?? [];
  return (
    <section aria-labelledby="alarm-sources-h" className="flex flex-col gap-2">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="alarm-sources-h" className="text-lg font-semibold">
          Alarm sources
        </h2>
        <Button size="sm" variant="secondary" onClick={() => setAdding(!adding)} aria-expanded={adding}>
          <Plus className="size-4" aria-hidden="true" /> Register a controller
        </Button>
      </div>
      <p className="text-sm text-slate">
        Building controllers that post their alarms to Coilpath, each request signed with the controller's secret. An accepted alarm runs
        the repeat-alarm rule at once.
      </p>
      {secret && <SecretOnce shown={secret} timeZone={timeZone} onClose={() => setSecret(null)} />}
      {adding && (
        <CreateSource
          branchId={branchId}
          onSecret={(x) => {
            setSecret(x);
            setAdding(false);
          }}
        />
      )}
      {q.isPending ? (
        <LoadingState label="Loading alarm sources…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      ) : rows.length === 0 ? (
        <EmptyState title="No alarm sources yet">
          Register a site's controller to receive its alarms without anyone typing them in.
        </EmptyState>
      ) : (
        <ul className="flex flex-col gap-3">
          {rows.map((s) => (
            <SourceCard key={s.id} s={s} timeZone={timeZone} branchId={branchId} onSecret={setSecret} />
          ))}
        </ul>
      )}
    </section>
  );
}
