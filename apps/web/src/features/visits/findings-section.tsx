import { useEffect, useEffectEvent, useRef } from 'react';
import { useForm } from 'react-hook-form';
import { onlineManager, useQueryClient } from '@tanstack/react-query';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import {
  causeCodeLabels,
  causeCodes,
  causeOriginLabels,
  causeOrigins,
  noteAudienceLabels,
  noteAudiences,
} from '@coilpath/contract/vocabulary';
import { findingInputSchema } from '@coilpath/contract/visits';
import type { FindingInput, VisitDetail } from '@coilpath/contract';
import { Button } from '@/components/ui/button';
import { SelectField, TextAreaField, TextField } from '@/components/ui/field';
import { useEnterNext } from '@/components/ui/enter-next';
import { Badge, Card } from '@/components/ui/page';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { queueWrite, useOutbox } from '@/lib/visit-outbox';
import type { VisitDraft } from './draft';

/** The form's own shape: selects and text give strings; the contract schema checks the result. */
const formSchema = z.object({
  unitId: z.string(),
  causeCode: z.enum(causeCodes, { message: 'Choose a cause' }),
  origin: z.enum(causeOrigins, { message: 'Choose where the cause came from' }),
  alarmCode: z.string().max(40),
  reportedCircuit: z.string(),
  actualCircuit: z.string(),
  notes: z.string().max(4000),
  notesAudience: z.enum(noteAudiences),
});
type FormValues = z.input<typeof formSchema>;

const toInput = (v: z.output<typeof formSchema>, id: string): FindingInput & { id: string } =>
  findingInputSchema.parse({
    id,
    unitId: v.unitId || null,
    causeCode: v.causeCode,
    origin: v.origin,
    alarmCode: v.alarmCode.trim() || null,
    reportedCircuit: v.reportedCircuit ? Number(v.reportedCircuit) : null,
    actualCircuit: v.actualCircuit ? Number(v.actualCircuit) : null,
    notes: v.notes.trim() || null,
    notesAudience: v.notesAudience,
  }) as FindingInput & { id: string };

export function FindingsSection({
  visit,
  draft,
  update,
}: {
  visit: VisitDetail;
  draft: VisitDraft;
  update(fn: (d: VisitDraft) => VisitDraft): void;
}) {
  const notify = useNotify();
  const qc = useQueryClient();
  const { entries } = useOutbox(visit.id);
  const circuits = [...new Set(visit.units.flatMap((u) => u.circuits.map((c) => c.number)))].sort((a, b) => a - b);
  const form = useForm<FormValues>({
    resolver: zodResolver(formSchema),
    defaultValues: {
      unitId: visit.units.length === 1 ? visit.units[0]!.id : '',
      causeCode: undefined,
      origin: undefined,
      alarmCode: '',
      reportedCircuit: '',
      actualCircuit: '',
      notes: '',
      notesAudience: 'internal',
    },
  });
  const unitTag = (id: string | null | undefined) => visit.units.find((u) => u.id === id)?.tag;

  // Through the outbox: shown at once, kept on the phone, sent in order once (its id makes a resend harmless).
  const send = (f: FindingInput & { id: string }) =>
    queueWrite(
      qc,
      { kind: 'finding', visitId: visit.id, body: f },
      {
        sent: () => notify(`Finding saved: ${causeCodeLabels[f.causeCode]}.`),
        stopped: (e) => notify(`Finding not saved: ${e.problem?.message ?? 'refused'}`, 'alarm'),
      },
    ).then(
      () => {
        if (!onlineManager.isOnline())
          notify(`Finding kept on this phone: ${causeCodeLabels[f.causeCode]}. It is sent when the connection is back.`);
      },
      (e: unknown) => notify(`Finding not kept: ${errorMessage(e)}`, 'alarm'),
    );

  // Findings a phone queued in its visit draft before the outbox existed move to the outbox once on site.
  const moveQueued = useEffectEvent(() => {
    const queued = draft.findings;
    if (!queued.length) return;
    update((d) => ({ ...d, findings: [] }));
    for (const f of queued) void send(f);
  });
  const moved = useRef(false);
  useEffect(() => {
    if (moved.current || !visit.canRecord) return;
    moved.current = true;
    moveQueued();
  }, [visit.canRecord]);

  const onSubmit = form.handleSubmit((v) => {
    const f = toInput(formSchema.parse(v), crypto.randomUUID());
    form.reset({ ...form.getValues(), alarmCode: '', reportedCircuit: '', actualCircuit: '', notes: '', notesAudience: 'internal' });
    void send(f);
  });

  // "Enter" in the alarm code moves on rather than adding the finding half filled.
  const { attach: enterGroup, onKeyDown: enterNext } = useEnterNext<HTMLFormElement>();
  const waitingIds = new Set(
    entries
      .filter((e) => e.state === 'waiting' && e.write.kind === 'finding')
      .map((e) => (e.write.kind === 'finding' ? e.write.body.id : '')),
  );
  const saved = visit.findings.filter((f) => !draft.findings.some((p) => p.id === f.id));
  const pending = draft.findings;
  return (
    <Card title="Findings">
      {saved.length + pending.length === 0 ? (
        <p className="mb-3 text-sm text-slate">No findings yet. Record what caused the problem and where it came from.</p>
      ) : (
        <ul className="mb-4 flex flex-col gap-2">
          {[...saved.map((f) => ({ f, isPending: waitingIds.has(f.id) })), ...pending.map((f) => ({ f, isPending: true }))].map(
            ({ f, isPending }) => (
              <li key={f.id} className="rounded-md border border-slate-line p-3 text-sm">
                <div className="flex flex-wrap items-center gap-2">
                  <strong>{causeCodeLabels[f.causeCode]}</strong>
                  <Badge>{causeOriginLabels[f.origin]}</Badge>
                  {f.alarmCode && <Badge tone="info">Alarm {f.alarmCode}</Badge>}
                  {unitTag(f.unitId) && visit.units.length > 1 && <Badge>{unitTag(f.unitId)}</Badge>}
                  {isPending && <Badge tone="watch">Waiting to send</Badge>}
                </div>
                {(f.reportedCircuit != null || f.actualCircuit != null) && (
                  <p className="mt-1">
                    Reported on circuit {f.reportedCircuit ?? '—'}, fault found on circuit {f.actualCircuit ?? '—'}
                    {f.reportedCircuit != null && f.actualCircuit != null && f.reportedCircuit !== f.actualCircuit && (
                      <strong className="text-alarm"> — circuits differ</strong>
                    )}
                  </p>
                )}
                {f.notes && (
                  <p className="mt-1 text-slate">
                    {f.notes} <span className="text-xs">({noteAudienceLabels[f.notesAudience ?? 'internal'].toLowerCase()})</span>
                  </p>
                )}
              </li>
            ),
          )}
        </ul>
      )}
      {visit.canRecord && (
        <form ref={enterGroup} onKeyDown={enterNext} onSubmit={onSubmit} noValidate className="grid grid-cols-1 gap-3 sm:grid-cols-2">
          {visit.units.length > 1 && (
            <SelectField label="Unit" {...form.register('unitId')}>
              <option value="">Not one unit</option>
              {visit.units.map((u) => (
                <option key={u.id} value={u.id}>
                  {u.tag}
                </option>
              ))}
            </SelectField>
          )}
          <SelectField label="Cause code" error={form.formState.errors.causeCode?.message} {...form.register('causeCode')}>
            <option value="">Choose…</option>
            {causeCodes.map((c) => (
              <option key={c} value={c}>
                {causeCodeLabels[c]}
              </option>
            ))}
          </SelectField>
          <SelectField label="Origin" error={form.formState.errors.origin?.message} {...form.register('origin')}>
            <option value="">Choose…</option>
            {causeOrigins.map((c) => (
              <option key={c} value={c}>
                {causeOriginLabels[c]}
              </option>
            ))}
          </SelectField>
          <TextField label="Alarm code (if any)" autoComplete="off" {...form.register('alarmCode')} />
          <SelectField label="Circuit the alarm was reported on" {...form.register('reportedCircuit')}>
            <option value="">None</option>
            {circuits.map((n) => (
              <option key={n} value={n}>
                Circuit {n}
              </option>
            ))}
          </SelectField>
          <SelectField label="Circuit where the fault really was" {...form.register('actualCircuit')}>
            <option value="">None</option>
            {circuits.map((n) => (
              <option key={n} value={n}>
                Circuit {n}
              </option>
            ))}
          </SelectField>
          <div className="sm:col-span-2">
            <TextAreaField label="Notes" {...form.register('notes')} />
          </div>
          <SelectField
            label="Who the notes are for"
            hint="Only notes for the customer go into the service summary."
            {...form.register('notesAudience')}
          >
            {noteAudiences.map((a) => (
              <option key={a} value={a}>
                {noteAudienceLabels[a]}
              </option>
            ))}
          </SelectField>
          <div className="sm:col-span-2">
            <Button type="submit" size="lg" variant="secondary" className="w-full sm:w-auto">
              Add finding
            </Button>
          </div>
        </form>
      )}
    </Card>
  );
}
