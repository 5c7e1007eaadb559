import { useEffect, useEffectEvent, useRef, useState } from 'react';
import { AlertTriangle } from 'lucide-react';
import { listRefrigerants } from '@coilpath/calc';
import { recordDate } from '@coilpath/contract/date-words';
import { refrigerantEventReasonLabels, refrigerantEventReasons } from '@coilpath/contract/vocabulary';
import type { RefrigerantEventReason, RefrigerantEventResult, VisitDetail } from '@coilpath/contract';
import { onlineManager, useQueryClient } from '@tanstack/react-query';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { Badge, Card, SafetyNote } from '@/components/ui/page';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { queueWrite, useOutbox } from '@/lib/visit-outbox';
import type { PendingRefrigerant, VisitDraft } from './draft';
import { useEnterNext } from '@/components/ui/enter-next';

const refrigerants = listRefrigerants();

export function RefrigerantSection({
  visit,
  draft,
  update,
}: {
  visit: VisitDetail;
  draft: VisitDraft;
  update(fn: (d: VisitDraft) => VisitDraft): void;
}) {
  const notify = useNotify();
  const first = visit.units[0];
  const [unitId, setUnitId] = useState(first?.id ?? '');
  const unit = visit.units.find((u) => u.id === unitId);
  const [refrigerant, setRefrigerant] = useState(unit?.refrigerant ?? 'R-410A');
  const [added, setAdded] = useState('');
  const [recovered, setRecovered] = useState('');
  const [reason, setReason] = useState<RefrigerantEventReason>('leak_top_off');
  const [lot, setLot] = useState('');
  /** The circuit by number ('' = the unit as a whole, or not said); asked only on a unit with several. */
  const [circuit, setCircuit] = useState('');
  const circuits = unit && unit.circuits.length > 1 ? [...unit.circuits].sort((a, b) => a.number - b.number) : [];
  const { attach: enterGroup, onKeyDown: enterNext } = useEnterNext<HTMLFormElement>();
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [lastResult, setLastResult] = useState<string | null>(null);

  const qc = useQueryClient();
  const { entries } = useOutbox(visit.id);
  // What the server computed from the event once it arrived (leak rate, a leak case).
  const arrived = (answer: unknown) => {
    const r = answer as RefrigerantEventResult;
    const rate = r.leakCheck
      ? ` Leak rate ${r.leakCheck.leakRatePercent.toFixed(1)} % a year (${r.leakCheck.method})${r.leakCheck.thresholdPercent !== null ? ` against ${r.leakCheck.thresholdPercent} % under ${r.leakCheck.rule}` : ', outside the leak-repair rules'}.`
      : '';
    const text =
      r.leakCaseOpened && r.leakCase
        ? `Refrigerant saved.${rate} A leak case is open: repair due ${recordDate(r.leakCase.repairDueDate)}. The branch manager sees it on the Watchlist.`
        : `Refrigerant saved.${rate}`;
    setLastResult(text);
    notify(text, r.leakCaseOpened ? 'alarm' : 'ok');
  };

  // Through the outbox: shown at once, kept on the phone, sent in order once (its id makes a resend harmless).
  const send = (p: PendingRefrigerant) =>
    queueWrite(
      qc,
      { kind: 'refrigerant', visitId: visit.id, unitId: p.unitId, body: p.body },
      { sent: arrived, stopped: (e) => notify(`Refrigerant not saved: ${e.problem?.message ?? 'refused'}`, 'alarm') },
    ).then(
      () => {
        if (!onlineManager.isOnline())
          notify('Refrigerant kept on this phone; it is sent when the connection is back (the leak rate is computed then).');
      },
      (e: unknown) => notify(`Refrigerant not kept: ${errorMessage(e)}`, 'alarm'),
    );

  // Events a phone queued in its visit draft before the outbox existed move to the outbox once on site.
  const moveQueued = useEffectEvent(() => {
    const queued = draft.refrigerant;
    if (!queued.length) return;
    update((d) => ({ ...d, refrigerant: [] }));
    for (const p of queued) void send(p);
  });
  const moved = useRef(false);
  useEffect(() => {
    if (moved.current || !visit.canRecord) return;
    moved.current = true;
    moveQueued();
  }, [visit.canRecord]);

  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    const a = added.trim() === '' ? 0 : Number(added);
    const r = recovered.trim() === '' ? 0 : Number(recovered);
    const errs: Record<string, string> = {};
    if (!Number.isFinite(a) || a < 0) errs.poundsAdded = 'Pounds cannot be negative';
    if (!Number.isFinite(r) || r < 0) errs.poundsRecovered = 'Pounds cannot be negative';
    if (!errs.poundsAdded && !errs.poundsRecovered && a === 0 && r === 0) errs.poundsAdded = 'Enter the pounds added or recovered';
    setErrors(errs);
    if (Object.keys(errs).length || !unit) return;
    const p: PendingRefrigerant = {
      unitId: unit.id,
      body: {
        id: crypto.randomUUID(),
        visitId: visit.id,
        refrigerant,
        poundsAdded: a,
        poundsRecovered: r,
        reason,
        cylinderLot: lot.trim() || null,
        // Only a circuit this unit has (the API refuses another); the leak rate stays per appliance.
        ...(circuits.some((c) => String(c.number) === circuit) ? { circuit: Number(circuit) } : {}),
      },
    };
    setAdded('');
    setRecovered('');
    setLot('');
    void send(p);
  };

  const pending = draft.refrigerant.filter((p) => !visit.refrigerantEvents.some((e) => e.id === p.body.id));
  const waitingIds = new Set(
    entries.filter((e) => e.state === 'waiting').map((e) => (e.write.kind === 'refrigerant' ? e.write.body.id : '')),
  );
  const mismatch = unit && refrigerant !== unit.refrigerant;
  return (
    <Card title="Refrigerant">
      <div className="flex flex-col gap-3">
        <SafetyNote>
          Refrigerant may be added or recovered only under the proper EPA 608 certification, following the manufacturer’s charging data.
          Coilpath computes the leak rate by the annualizing method of 40 CFR 82.152; check the current rules before relying on it.
        </SafetyNote>
        {visit.refrigerantEvents.length + pending.length > 0 && (
          <ul className="flex flex-col gap-1 text-sm">
            {visit.refrigerantEvents.map((ev) => (
              <li key={ev.id} className="tabular-nums">
                {ev.refrigerant}: added {ev.poundsAdded.toFixed(1)} lb, recovered {ev.poundsRecovered.toFixed(1)} lb ·{' '}
                {refrigerantEventReasonLabels[ev.reason]}
                {ev.circuit != null ? ` · circuit ${ev.circuit}` : ''}
                {ev.cylinderLot ? ` · lot ${ev.cylinderLot}` : ''}
                {waitingIds.has(ev.id) && (
                  <>
                    {' '}
                    <Badge tone="watch">Waiting to send</Badge>
                  </>
                )}
              </li>
            ))}
            {pending.map((p) => (
              <li key={p.body.id} className="tabular-nums">
                {p.body.refrigerant}: added {(p.body.poundsAdded ?? 0).toFixed(1)} lb, recovered {(p.body.poundsRecovered ?? 0).toFixed(1)}{' '}
                lb <Badge tone="watch">Not saved yet</Badge>
              </li>
            ))}
          </ul>
        )}
        {lastResult && (
          <p role="status" className="rounded-md bg-frost p-2 text-sm">
            {lastResult}
          </p>
        )}
        {visit.canRecord && (
          <form ref={enterGroup} onKeyDown={enterNext} onSubmit={submit} noValidate className="grid grid-cols-2 gap-3 lg:grid-cols-3">
            {visit.units.length > 1 && (
              <div className="col-span-2 lg:col-span-1">
                <SelectField
                  label="Unit"
                  value={unitId}
                  onChange={(e) => {
                    setUnitId(e.target.value);
                    setCircuit('');
                    const u = visit.units.find((x) => x.id === e.target.value);
                    if (u) setRefrigerant(u.refrigerant);
                  }}
                >
                  {visit.units.map((u) => (
                    <option key={u.id} value={u.id}>
                      {u.tag} ({u.refrigerant}, full charge {u.fullChargeLb} lb)
                    </option>
                  ))}
                </SelectField>
              </div>
            )}
            {circuits.length > 0 && (
              <div className="col-span-2 lg:col-span-1">
                <SelectField
                  label="Circuit"
                  value={circuit}
                  onChange={(e) => setCircuit(e.target.value)}
                  hint="The leak rate stays per appliance: pounds on any circuit count against the unit’s full charge."
                >
                  <option value="">Whole unit (no one circuit)</option>
                  {circuits.map((c) => (
                    <option key={c.id} value={String(c.number)}>
                      Circuit {c.number}
                      {c.chargeLb !== null ? ` (charge ${c.chargeLb} lb)` : ''}
                    </option>
                  ))}
                </SelectField>
              </div>
            )}
            <TextField
              label="Pounds added (lb)"
              inputMode="decimal"
              value={added}
              onChange={(e) => setAdded(e.target.value)}
              error={errors.poundsAdded}
            />
            <TextField
              label="Pounds recovered (lb)"
              inputMode="decimal"
              value={recovered}
              onChange={(e) => setRecovered(e.target.value)}
              error={errors.poundsRecovered}
            />
            <SelectField
              label="Refrigerant"
              value={refrigerant}
              onChange={(e) => setRefrigerant(e.target.value)}
              error={errors.refrigerant}
            >
              {refrigerants.map((r) => (
                <option key={r.id} value={r.id}>
                  {r.id}
                </option>
              ))}
            </SelectField>
            <SelectField label="Reason" value={reason} onChange={(e) => setReason(e.target.value as RefrigerantEventReason)}>
              {refrigerantEventReasons.map((r) => (
                <option key={r} value={r}>
                  {refrigerantEventReasonLabels[r]}
                </option>
              ))}
            </SelectField>
            <TextField label="Cylinder or lot number" value={lot} onChange={(e) => setLot(e.target.value)} autoComplete="off" />
            {mismatch && (
              <p className="col-span-2 inline-flex items-center gap-1 text-sm text-watch lg:col-span-3">
                <AlertTriangle className="size-4" aria-hidden="true" /> The unit is on file with {unit.refrigerant}; check the nameplate
                before adding {refrigerant}.
              </p>
            )}
            <div className="col-span-2 lg:col-span-3">
              <Button type="submit" size="lg" variant="secondary" className="w-full sm:w-auto">
                Save refrigerant
              </Button>
            </div>
          </form>
        )}
      </div>
    </Card>
  );
}
