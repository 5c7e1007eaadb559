import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { AlertTriangle } from 'lucide-react';
import type { Booking, Technician } from '@coilpath/contract';
import { priorityLabels, workOrderKindLabels, workOrderLabel, workOrderStateLabels } from '@coilpath/contract';
import { Button } from '@/components/ui/button';
import { SelectField, TextAreaField, TextField } from '@/components/ui/field';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { formatInZone } from '@/lib/format';
import { isOutsideHours, isStale, useDeleteBooking, useUpdateBooking } from './api';
import { bookFormSchema } from './book-dialog';
import { bookingSummary, certLabel, leakDeadline, Modal, Refusal } from './parts';
import { instantToLocal, localToInstant } from './zone';
import type { z } from 'zod';

export interface BookingEdit {
  booking: Booking;
  /** Times the dispatcher tried (a drag the server refused), to retry with an override. */
  attempt?: { techId: string; startAt: string; endAt: string } | undefined;
  error?: string | undefined;
  outsideHours?: boolean | undefined;
}

/** One booking: what it is, and move, reassign or unbook it. */
export function BookingDialog({ edit, techs, timeZone, today, onClose }: { edit: BookingEdit | null; techs: Technician[]; timeZone: string; today: string; onClose: () => void }) {
  const b = edit?.booking;
  return (
    <Modal open={!!edit} onClose={onClose} title={b ? `${workOrderLabel(b.workOrder.number)} · ${workOrderKindLabels[b.workOrder.kind]}` : ''}>
      {edit && <Body edit={edit} techs={techs} timeZone={timeZone} today={today} onClose={onClose} />}
    </Modal>
  );
}

type Form = z.input<typeof bookFormSchema>;
type FormOut = z.output<typeof bookFormSchema>;

function Body({ edit, techs, timeZone, today, onClose }: { edit: BookingEdit; techs: Technician[]; timeZone: string; today: string; onClose: () => void }) {
  const { booking: b } = edit;
  const notify = useNotify();
  const update = useUpdateBooking();
  const remove = useDeleteBooking();
  const [refusal, setRefusal] = useState<string | undefined>(edit.error);
  const [canOverride, setCanOverride] = useState(!!edit.outsideHours || b.hoursOverride);
  const at = edit.attempt ?? { techId: b.techId, startAt: b.startAt, endAt: b.endAt };
  const start = instantToLocal(at.startAt, timeZone);
  const form = useForm<Form, unknown, FormOut>({
    resolver: zodResolver(bookFormSchema),
    defaultValues: {
      techId: at.techId,
      date: start.date,
      time: start.time,
      minutes: Math.round((Date.parse(at.endAt) - Date.parse(at.startAt)) / 60_000),
      overrideHours: false,
      overrideReason: '',
    },
  });
  const { register, handleSubmit, watch, formState } = form;
  const override = watch('overrideHours');
  const tech = techs.find((t) => t.id === b.techId);
  const movable = b.workOrder.state === 'booked';
  const w = b.workOrder;
  const leak = leakDeadline(w.leakRepairDueDate, today, instantToLocal(b.startAt, timeZone).date);

  const staleNotice = () => notify('Moved by someone else. The calendar now shows this booking as it is; make your change again if it is still needed.', 'alarm');

  const onSubmit = handleSubmit((v) => {
    setRefusal(undefined);
    const startAt = localToInstant(v.date, v.time, timeZone);
    const endAt = new Date(Date.parse(startAt) + v.minutes * 60_000).toISOString();
    update.mutate(
      { id: b.id, version: b.version, techId: v.techId, startAt, endAt, ...(v.overrideHours ? { overrideHours: true, overrideReason: v.overrideReason } : {}) },
      {
        onSuccess: (nb) => {
          notify(`Saved: ${bookingSummary(nb, techs.find((t) => t.id === nb.techId), timeZone)}.`);
          onClose();
        },
        onError: (e) => {
          if (isStale(e)) {
            staleNotice();
            onClose();
            return;
          }
          setRefusal(errorMessage(e));
          if (isOutsideHours(e)) setCanOverride(true);
        },
      },
    );
  });

  function unbook() {
    setRefusal(undefined);
    remove.mutate(b.id, {
      onSuccess: () => {
        notify(`Unbooked ${workOrderLabel(w.number)}; it is back in the unplaced work.`);
        onClose();
      },
      onError: (e) => setRefusal(errorMessage(e)),
    });
  }

  return (
    <div className="flex flex-col gap-4">
      <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
        <dt className="text-slate">Site</dt>
        <dd>{w.siteName}</dd>
        {w.unitTag && (
          <>
            <dt className="text-slate">Unit</dt>
            <dd>
              {w.unitTag} · {w.unitMake} {w.unitModel}
            </dd>
          </>
        )}
        <dt className="text-slate">Priority</dt>
        <dd>{priorityLabels[w.priority]}</dd>
        <dt className="text-slate">Complaint</dt>
        <dd>{w.complaint || '—'}</dd>
        <dt className="text-slate">Booked</dt>
        <dd>
          {tech?.name ?? 'Technician'}, {formatInZone(b.startAt, timeZone, 'EEE d MMM, HH:mm')}–{formatInZone(b.endAt, timeZone, 'HH:mm')}
        </dd>
        <dt className="text-slate">State</dt>
        <dd>{workOrderStateLabels[w.state]}</dd>
        {b.hoursOverride && (
          <>
            <dt className="text-slate">Outside hours</dt>
            <dd>{b.overrideReason}</dd>
          </>
        )}
      </dl>
      {leak && (
        <p className={`flex items-center gap-2 text-sm font-medium ${leak.overdue ? 'text-alarm' : 'text-watch'}`}>
          <AlertTriangle className="size-4" aria-hidden="true" /> {leak.text}
        </p>
      )}
      {movable ? (
        <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3" aria-label="Move or reassign">
          <SelectField label="Technician" error={formState.errors.techId?.message} {...register('techId')}>
            {techs.map((t) => (
              <option key={t.id} value={t.id}>
                {t.name} ({certLabel(t)})
              </option>
            ))}
          </SelectField>
          <div className="grid grid-cols-3 gap-3">
            <TextField label="Date" type="date" error={formState.errors.date?.message} {...register('date')} />
            <TextField label="Start" type="time" step={300} error={formState.errors.time?.message} {...register('time')} />
            <TextField label="Minutes" type="number" inputMode="numeric" min={15} step={15} error={formState.errors.minutes?.message} {...register('minutes')} />
          </div>
          {(canOverride || override) && (
            <fieldset className="flex flex-col gap-2 rounded-md border border-watch-base/50 bg-watch-tint p-3">
              <legend className="px-1 text-sm font-medium">Working hours</legend>
              <label className="flex items-center gap-2 text-sm">
                <input type="checkbox" className="size-5" {...register('overrideHours')} />
                Book outside the technician’s working hours anyway
              </label>
              {override && <TextAreaField label="Why (kept with the booking)" error={formState.errors.overrideReason?.message} {...register('overrideReason')} />}
            </fieldset>
          )}
          <Refusal message={refusal} />
          <div className="flex flex-wrap gap-2">
            <Button type="submit" busy={update.isPending}>
              Save changes
            </Button>
            <Button variant="danger" busy={remove.isPending} onClick={unbook}>
              Unbook
            </Button>
            <Button variant="secondary" onClick={onClose}>
              Close
            </Button>
          </div>
        </form>
      ) : (
        <>
          <p className="text-sm text-slate">
            {w.state === 'closed' || w.state === 'cancelled'
              ? `This work order is ${workOrderStateLabels[w.state].toLowerCase()}; its booking stays as a record.`
              : 'The technician has started this visit; the booking can no longer be moved or unbooked.'}
          </p>
          <Refusal message={refusal} />
        </>
      )}
    </div>
  );
}
