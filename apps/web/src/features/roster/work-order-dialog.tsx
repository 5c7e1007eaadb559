import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { z } from 'zod';
import { kindsWithOrigin, workOrderCreateSchema, workOrderLabel } from '@coilpath/contract/work-orders';
import { priorities, priorityLabels, workOrderKindLabels, workOrderKinds, workOrderStateLabels } from '@coilpath/contract/vocabulary';
import { Button } from '@/components/ui/button';
import { SelectField, TextAreaField, TextField } from '@/components/ui/field';
import { useNotify } from '@/components/ui/notices';
import { ApiError, errorMessage } from '@/lib/api-client';
import { useCreateWorkOrder, useRosterSites, useSiteWorkOrders } from './api';
import { Modal, Refusal } from './parts';
import { localToInstant } from './zone';

type Form = z.input<typeof workOrderCreateSchema>;
type FormOut = z.output<typeof workOrderCreateSchema>;

/** A `datetime-local` value (branch time) as an ISO instant, or null when empty. */
const localInstant = (timeZone: string) => (v: unknown) => {
  if (typeof v !== 'string' || v === '') return null;
  const [d, t] = v.split('T');
  return d && t ? localToInstant(d, t.slice(0, 5), timeZone) : v;
};

export function WorkOrderDialog({
  open,
  branchId,
  timeZone,
  skills,
  onClose,
}: {
  open: boolean;
  branchId: string;
  timeZone: string;
  skills: string[];
  onClose: () => void;
}) {
  return (
    <Modal open={open} onClose={onClose} title="New work order">
      {open && <Body branchId={branchId} timeZone={timeZone} skills={skills} onClose={onClose} />}
    </Modal>
  );
}

function Body({ branchId, timeZone, skills, onClose }: { branchId: string; timeZone: string; skills: string[]; onClose: () => void }) {
  const notify = useNotify();
  const create = useCreateWorkOrder();
  const sites = useRosterSites(branchId, true);
  const [refusal, setRefusal] = useState<string>();
  const form = useForm<Form, unknown, FormOut>({
    resolver: zodResolver(workOrderCreateSchema),
    defaultValues: {
      kind: 'service_call',
      priority: 'normal',
      complaint: '',
      estimatedMinutes: 60,
      siteId: '',
      unitId: null,
      originWorkOrderId: null,
    },
  });
  const { register, handleSubmit, watch, formState, setError } = form;
  const siteId = watch('siteId');
  const kind = watch('kind');
  const site = sites.data?.find((s) => s.id === siteId);
  const needsOrigin = (kindsWithOrigin as readonly string[]).includes(kind);
  const origins = useSiteWorkOrders(branchId, needsOrigin && siteId ? siteId : undefined);
  const err = formState.errors;

  const onSubmit = handleSubmit((v) => {
    setRefusal(undefined);
    create.mutate(v, {
      onSuccess: (w) => {
        notify(`Created ${workOrderLabel(w.number)} (${workOrderKindLabels[w.kind]} at ${w.siteName}); it waits in the unplaced work.`);
        onClose();
      },
      onError: (e) => {
        if (e instanceof ApiError) for (const [path, message] of Object.entries(e.fieldErrors)) setError(path as keyof Form, { message });
        setRefusal(errorMessage(e));
      },
    });
  });

  const optional = { setValueAs: (v: unknown) => (v === '' ? null : v) };
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3">
      <SelectField label="Site" error={err.siteId?.message} hint={sites.isPending ? 'Loading sites…' : undefined} {...register('siteId')}>
        <option value="">Choose a site</option>
        {sites.data?.map((s) => (
          <option key={s.id} value={s.id}>
            {s.name} — {s.address}
          </option>
        ))}
      </SelectField>
      <SelectField label="Unit (optional)" error={err.unitId?.message} disabled={!site} {...register('unitId', optional)}>
        <option value="">{site ? 'Whole site / not known yet' : 'Choose a site first'}</option>
        {site?.units.map((u) => (
          <option key={u.id} value={u.id}>
            {u.tag} · {u.make} {u.model} ({u.refrigerant})
          </option>
        ))}
      </SelectField>
      <div className="grid grid-cols-2 gap-3">
        <SelectField label="Kind" error={err.kind?.message} {...register('kind')}>
          {workOrderKinds.map((k) => (
            <option key={k} value={k}>
              {workOrderKindLabels[k]}
            </option>
          ))}
        </SelectField>
        <SelectField label="Priority" error={err.priority?.message} {...register('priority')}>
          {priorities.map((p) => (
            <option key={p} value={p}>
              {priorityLabels[p]}
            </option>
          ))}
        </SelectField>
      </div>
      {needsOrigin && (
        <SelectField
          label="Comes from work order"
          error={err.originWorkOrderId?.message}
          hint="A return visit or callback goes back to earlier work at the same site."
          disabled={!siteId}
          {...register('originWorkOrderId', optional)}
        >
          <option value="">{siteId ? 'Choose the earlier work order' : 'Choose a site first'}</option>
          {origins.data?.map((w) => (
            <option key={w.id} value={w.id}>
              {workOrderLabel(w.number)} · {workOrderKindLabels[w.kind]} · {workOrderStateLabels[w.state]}
              {w.unitTag ? ` · ${w.unitTag}` : ''}
            </option>
          ))}
        </SelectField>
      )}
      <TextAreaField label="Complaint or purpose" error={err.complaint?.message} {...register('complaint')} />
      <div className="grid grid-cols-2 gap-3">
        <TextField
          label={`Requested from (${timeZone})`}
          type="datetime-local"
          error={err.requestedFrom?.message}
          {...register('requestedFrom', { setValueAs: localInstant(timeZone) })}
        />
        <TextField
          label={`Requested to (${timeZone})`}
          type="datetime-local"
          error={err.requestedTo?.message}
          {...register('requestedTo', { setValueAs: localInstant(timeZone) })}
        />
      </div>
      <div className="grid grid-cols-3 gap-3">
        <TextField
          label="Estimated minutes"
          type="number"
          inputMode="numeric"
          min={15}
          step={15}
          error={err.estimatedMinutes?.message}
          {...register('estimatedMinutes')}
        />
        <TextField
          label="Required skill"
          list="roster-skills"
          error={err.requiredSkill?.message}
          {...register('requiredSkill', optional)}
        />
        <SelectField label="EPA 608 needed" error={err.requiredCertification?.message} {...register('requiredCertification', optional)}>
          <option value="">None</option>
          <option value="I">Type I</option>
          <option value="II">Type II</option>
          <option value="III">Type III</option>
          <option value="universal">Universal</option>
        </SelectField>
      </div>
      <datalist id="roster-skills">
        {skills.map((s) => (
          <option key={s} value={s} />
        ))}
      </datalist>
      <Refusal message={refusal} />
      <div className="flex flex-wrap gap-2">
        <Button type="submit" busy={create.isPending}>
          Create work order
        </Button>
        <Button variant="secondary" onClick={onClose}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
