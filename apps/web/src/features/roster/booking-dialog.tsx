import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { AlertTriangle } from 'lucide-react';
import type { Booking, BookingRule, Technician } from '@coilpath/contract';
import { priorityLabels, workOrderKindLabels, workOrderStateLabels } from '@coilpath/contract/vocabulary';
import { workOrderLabel } from '@coilpath/contract/work-orders';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { formatInZone } from '@/lib/format';
import { isStale, useDeleteBooking, useUpdateBooking } from './api';
import { bookFormSchema, formSpan } from './book-dialog';
import { bookingSummary, certLabel, leakDeadline, Modal, Refusal } from './parts';
import { RuleOverride } from './rule-override';
import { bookingRuleJob, overrideSummary, placementBreaches, refusedRules } from './rules';
import { instantToLocal, localToInstant } from './zone';
import type { z } from 'zod';

export interface BookingEdit {
  booking: Booking;
  /** Times the dispatcher tried (a drag the server refused), to retry with an override. */
  attempt?: { techId: string; startAt: string; endAt: string } | undefined;
  error?: string | undefined;
  /** The booking rules the API's refusal named: offered to override. */
  refusedRules?: BookingRule[] | undefined;
}

/** One booking: what it is, and move, reassign or unbook it. */
export function BookingDialog({
  edit,
  techs,
  timeZone,
  today,
  onClose,
}: {
  edit: BookingEdit | null;
  techs: Technician[];
  timeZone: string;
  today: string;
  onClose: () => void;
}) {
  const b = edit?.booking;
  return (
    <Modal
      open={!!edit}
      onClose={onClose}
      title={b ? `${workOrderLabel(b.workOrder.number)} · ${workOrderKindLabels[b.workOrder.kind]}` : ''}
    >
      {edit && <Body edit={edit} techs={techs} timeZone={timeZone} today={today} onClose={onClose} />}
    </Modal>
  );
}

type Form = z.input<typeof bookFormSchema>;
type FormOut = z.output<typeof bookFormSchema>;

function Body({
  edit,
  techs,
  timeZone,
  today,
  onClose,
}: {
  edit: BookingEdit;
  techs: Technician[];
  timeZone: string;
  today: string;
  onClose: () => void;
}) {
  const { booking: b } = edit;
  const notify = useNotify();
  const update = useUpdateBooking();
  const remove = useDeleteBooking();
  const [refusal, setRefusal] = useState<string | undefined>(edit.error);
  const [refused, setRefused] = useState<BookingRule[]>(edit.refusedRules ?? []);
  const at = edit.attempt ?? { techId: b.techId, startAt: b.startAt, endAt: b.endAt };
  const start = instantToLocal(at.startAt, timeZone);
  const form = useForm<Form, unknown, FormOut>({
    resolver: zodResolver(bookFormSchema),
    defaultValues: {
      techId: at.techId,
      date: start.date,
      time: start.time,
      minutes: Math.round((Date.parse(at.endAt) - Date.parse(at.startAt)) / 60_000),
      // The booking's own override stays ticked, with its reason, so a change keeps it in view (and in force).
      overrideRules: b.overrideRules,
      overrideReason: b.overrideReason ?? '',
    },
  });
  const { register, handleSubmit, watch, formState, setValue } = form;
  const ticked = watch('overrideRules');
  const span = formSpan({ date: watch('date'), time: watch('time'), minutes: watch('minutes') }, timeZone);
  // The rules the chosen technician and time break, said before the dispatcher saves.
  const warnings = placementBreaches(
    bookingRuleJob(b),
    techs.find((t) => t.id === watch('techId')),
    timeZone,
    span.startAt,
    span.endAt,
  );
  const toggle = (rule: BookingRule, on: boolean) =>
    setValue('overrideRules', on ? [...ticked.filter((r) => r !== rule), rule] : ticked.filter((r) => r !== rule), {
      shouldValidate: formState.isSubmitted,
    });
  const overridden = overrideSummary(b);
  const tech = techs.find((t) => t.id === b.techId);
  const movable = b.workOrder.state === 'booked';
  const w = b.workOrder;
  const leak = leakDeadline(w.leakRepairDueDate, today, instantToLocal(b.startAt, timeZone).date);

  const staleNotice = () =>
    notify('Moved by someone else. The calendar now shows this booking as it is; make your change again if it is still needed.', 'alarm');

  const onSubmit = handleSubmit((v) => {
    setRefusal(undefined);
    const startAt = localToInstant(v.date, v.time, timeZone);
    const endAt = new Date(Date.parse(startAt) + v.minutes * 60_000).toISOString();
    update.mutate(
      {
        id: b.id,
        version: b.version,
        techId: v.techId,
        startAt,
        endAt,
        ...(v.overrideRules.length ? { overrideRules: v.overrideRules, overrideReason: v.overrideReason } : {}),
      },
      {
        onSuccess: (nb) => {
          notify(
            `Saved: ${bookingSummary(
              nb,
              techs.find((t) => t.id === nb.techId),
              timeZone,
            )}.`,
          );
          onClose();
        },
        onError: (e) => {
          if (isStale(e)) {
            staleNotice();
            onClose();
            return;
          }
          setRefusal(errorMessage(e));
          setRefused(refusedRules(e));
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
        {w.dueAt && (
          <>
            <dt className="text-slate">Due</dt>
            <dd>{formatInZone(w.dueAt, timeZone, 'EEE d MMM, HH:mm')}</dd>
          </>
        )}
        {overridden && (
          <>
            <dt className="text-slate">Override</dt>
            <dd data-testid="booking-override">{overridden.sentence}</dd>
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
            <TextField
              label="Minutes"
              type="number"
              inputMode="numeric"
              min={15}
              step={15}
              error={formState.errors.minutes?.message}
              {...register('minutes')}
            />
          </div>
          <RuleOverride
            warnings={warnings}
            refused={refused}
            ticked={ticked}
            onToggle={toggle}
            reasonField={register('overrideReason')}
            reasonError={formState.errors.overrideReason?.message}
          />
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
