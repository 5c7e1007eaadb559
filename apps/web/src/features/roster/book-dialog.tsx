import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { CheckCircle2, Sparkles, XCircle } from 'lucide-react';
import type { BookingRule, Candidate, Technician, WorkOrder } from '@coilpath/contract';
import { bookingRuleSchema, maxBookingMinutes } from '@coilpath/contract/roster';
import { idSchema, isoDateSchema, limits } from '@coilpath/contract/common';
import { priorityLabels } from '@coilpath/contract/vocabulary';
import { workOrderLabel } from '@coilpath/contract/work-orders';
import { Button } from '@/components/ui/button';
import { SafetyNote } from '@/components/ui/page';
import { SelectField, TextField } from '@/components/ui/field';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { formatInZone } from '@/lib/format';
import { useCreateBooking, useSuggest } from './api';
import { certLabel, Modal, Refusal, TechSwatch, workOrderTitle } from './parts';
import { RuleOverride } from './rule-override';
import { placementBreaches, refusedRules, workRuleJob } from './rules';
import { instantToLocal, localToInstant } from './zone';

const hhmmRe = /^([01]\d|2[0-3]):[0-5]\d$/;

/** The booking form: local date and time in the branch's zone, turned into instants for the API. */
export const bookFormSchema = z
  .object({
    techId: idSchema.or(z.literal('')).refine((v) => v !== '', 'Choose a technician'),
    date: isoDateSchema,
    time: z.string().regex(hhmmRe, 'Use 24-hour HH:MM'),
    minutes: z.coerce
      .number({ message: 'Enter minutes' })
      .int('Use whole minutes')
      .min(15, 'At least 15 minutes')
      .max(maxBookingMinutes, 'At most 16 hours'),
    /** The booking rules to book against anyway, with one reason. */
    overrideRules: z.array(bookingRuleSchema),
    overrideReason: z.string().trim().max(limits.shortText),
  })
  .refine((v) => v.overrideRules.length === 0 || v.overrideReason.length > 0, {
    message: 'Say why this booking may break the rule',
    path: ['overrideReason'],
  });
type BookForm = z.input<typeof bookFormSchema>;
type BookFormOut = z.output<typeof bookFormSchema>;

/** The form's start and end as instants, or nulls while the date, time or length is not valid yet. */
export function formSpan(
  v: { date: string; time: string; minutes: unknown },
  timeZone: string,
): { startAt: string | null; endAt: string | null } {
  const minutes = Number(v.minutes);
  if (!/^\d{4}-\d{2}-\d{2}$/.test(v.date) || !hhmmRe.test(v.time) || !(minutes > 0)) return { startAt: null, endAt: null };
  try {
    const startAt = localToInstant(v.date, v.time, timeZone);
    return { startAt, endAt: new Date(Date.parse(startAt) + minutes * 60_000).toISOString() };
  } catch {
    return { startAt: null, endAt: null };
  }
}

/**
 * What the form says about the chosen technician when the server proposes no start for them: the rule
 * that stands in the way, or — only when that is what it is — too little free time.
 */
export function unproposedText(c: Pick<Candidate, 'name' | 'reasons' | 'blockedBy'>): string {
  const why = c.reasons.slice(0, Math.max(1, c.blockedBy.length)).join('; ');
  if (c.blockedBy.every((b) => b === 'free_time' || b === 'window')) {
    const inWindow = c.blockedBy.includes('window') ? ', in the time the job allows' : '';
    return `${c.name} has no free time for this job that day${inWindow}: ${why}. Pick another technician or day, or set a time.`;
  }
  return `${c.name} is not proposed for this job that day: ${why}. Pick another technician or day, or book against the rule with a reason.`;
}

export interface BookInitial {
  techId?: string | undefined;
  date: string;
  time: string;
  error?: string | undefined;
  /** The booking rules the API's refusal named (a drop it refused): offered to override. */
  refusedRules?: BookingRule[] | undefined;
  /**
   * Start at the time the server proposes for the chosen technician on the chosen day (the booking
   * flow from a board cell), as long as the dispatcher has not typed a time.
   */
  proposeTime?: boolean | undefined;
}

export function BookDialog({
  workOrder,
  techs,
  timeZone,
  initial,
  onClose,
}: {
  workOrder: WorkOrder | null;
  techs: Technician[];
  timeZone: string;
  initial: BookInitial;
  onClose: () => void;
}) {
  return (
    <Modal open={!!workOrder} onClose={onClose} title={workOrder ? `Book ${workOrderTitle(workOrder)}` : ''} wide>
      {workOrder && <BookBody workOrder={workOrder} techs={techs} timeZone={timeZone} initial={initial} onClose={onClose} />}
    </Modal>
  );
}

function BookBody({
  workOrder: w,
  techs,
  timeZone,
  initial,
  onClose,
}: {
  workOrder: WorkOrder;
  techs: Technician[];
  timeZone: string;
  initial: BookInitial;
  onClose: () => void;
}) {
  const notify = useNotify();
  const create = useCreateBooking();
  const suggest = useSuggest();
  const [refusal, setRefusal] = useState<string | undefined>(initial.error);
  const [refused, setRefused] = useState<BookingRule[]>(initial.refusedRules ?? []);
  const form = useForm<BookForm, unknown, BookFormOut>({
    resolver: zodResolver(bookFormSchema),
    defaultValues: {
      techId: initial.techId ?? '',
      date: initial.date,
      time: initial.time,
      minutes: w.estimatedMinutes,
      overrideRules: [],
      overrideReason: '',
    },
  });
  const { register, handleSubmit, watch, formState, setValue, getFieldState } = form;
  const date = watch('date');
  const techId = watch('techId');
  const ticked = watch('overrideRules');
  const span = formSpan({ date, time: watch('time'), minutes: watch('minutes') }, timeZone);
  // The rules the chosen technician and time break, said before the dispatcher confirms.
  const warnings = placementBreaches(
    workRuleJob(w),
    techs.find((t) => t.id === techId),
    timeZone,
    span.startAt,
    span.endAt,
  );
  const toggle = (rule: BookingRule, on: boolean) =>
    setValue('overrideRules', on ? [...ticked.filter((r) => r !== rule), rule] : ticked.filter((r) => r !== rule), {
      shouldValidate: formState.isSubmitted,
    });

  const { mutate: runSuggest } = suggest;
  useEffect(() => {
    if (/^\d{4}-\d{2}-\d{2}$/.test(date)) runSuggest({ workOrderId: w.id, day: date });
  }, [date, w.id, runSuggest]);

  // From a board cell: the chosen technician's proposed start, computed by the server for that day.
  const proposal = initial.proposeTime && suggest.data?.day === date ? suggest.data.candidates.find((c) => c.techId === techId) : undefined;
  const proposedTime = proposal?.proposedStart ? instantToLocal(proposal.proposedStart, timeZone).time : undefined;
  useEffect(() => {
    if (proposedTime && !getFieldState('time').isDirty) setValue('time', proposedTime);
  }, [proposedTime, getFieldState, setValue]);

  const techName = (id: string) => techs.find((t) => t.id === id)?.name ?? 'the technician';

  function book(body: { techId: string; startAt: string; endAt: string; overrideRules?: BookingRule[]; overrideReason?: string }) {
    setRefusal(undefined);
    create.mutate(
      { workOrderId: w.id, ...body },
      {
        onSuccess: (b) => {
          notify(
            `Booked ${workOrderLabel(w.number)} with ${techName(b.techId)}, ${formatInZone(b.startAt, timeZone, 'EEE d MMM, HH:mm')}–${formatInZone(b.endAt, timeZone, 'HH:mm')}.`,
          );
          onClose();
        },
        onError: (e) => {
          setRefusal(errorMessage(e));
          setRefused(refusedRules(e));
        },
      },
    );
  }

  const onSubmit = handleSubmit((v) => {
    const startAt = localToInstant(v.date, v.time, timeZone);
    const endAt = new Date(Date.parse(startAt) + v.minutes * 60_000).toISOString();
    book({
      techId: v.techId,
      startAt,
      endAt,
      ...(v.overrideRules.length ? { overrideRules: v.overrideRules, overrideReason: v.overrideReason } : {}),
    });
  });

  return (
    <div className="grid gap-5 md:grid-cols-2">
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3" aria-label="Book at a time you choose">
        <p className="text-sm text-slate">
          {w.siteName}
          {w.unitTag ? ` · ${w.unitTag} ${w.unitMake ?? ''} ${w.unitModel ?? ''}` : ''} · {priorityLabels[w.priority]} · {w.complaint}
        </p>
        {w.requiredCertification && (
          <SafetyNote>
            This work opens the refrigerant circuit: only a technician holding EPA 608{' '}
            {w.requiredCertification === 'universal' ? 'Universal' : `Type ${w.requiredCertification} or Universal`} may do it. Follow the
            manufacturer’s data, local codes and licensed practice.
          </SafetyNote>
        )}
        <SelectField label="Technician" error={formState.errors.techId?.message} {...register('techId')}>
          <option value="">Choose a technician</option>
          {techs.map((t) => (
            <option key={t.id} value={t.id}>
              {t.name} ({certLabel(t)})
            </option>
          ))}
        </SelectField>
        <div className="grid grid-cols-2 gap-3">
          <TextField label="Date" type="date" error={formState.errors.date?.message} {...register('date')} />
          <TextField label={`Start (${timeZone})`} type="time" step={300} error={formState.errors.time?.message} {...register('time')} />
        </div>
        {proposal && (
          <p className={`text-sm ${proposal.proposedStart ? 'text-slate' : 'text-alarm'}`} role="status">
            {proposal.proposedStart
              ? `Start ${proposedTime}: the first free time the Roster found for ${proposal.name} that day. Change it if you need another.`
              : unproposedText(proposal)}
          </p>
        )}
        <TextField
          label="Length in minutes"
          type="number"
          inputMode="numeric"
          min={15}
          step={15}
          error={formState.errors.minutes?.message}
          {...register('minutes')}
        />
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
          <Button type="submit" busy={create.isPending}>
            Book
          </Button>
          <Button variant="secondary" onClick={onClose}>
            Cancel
          </Button>
        </div>
      </form>

      <section aria-labelledby="suggest-heading" className="flex flex-col gap-2">
        <h3 id="suggest-heading" className="flex items-center gap-2 text-base font-semibold">
          <Sparkles className="size-4 text-coolant" aria-hidden="true" /> Suggested technicians for {date}
        </h3>
        <p className="text-xs text-slate">
          Ranked by skills, certification, free time, drive from the previous stop and earlier visits to this unit.
        </p>
        {suggest.isPending ? (
          <p role="status" className="text-sm text-slate">
            Ranking technicians…
          </p>
        ) : suggest.isError ? (
          <Refusal message={errorMessage(suggest.error)} />
        ) : suggest.data ? (
          <ol className="flex flex-col gap-2">
            {suggest.data.candidates.map((c) => {
              const tech = techs.find((t) => t.id === c.techId);
              return (
                <li
                  key={c.techId}
                  className={`rounded-md border p-2 ${c.eligible ? 'border-slate-line' : 'border-dashed border-slate-line bg-frost text-slate'} ${initial.proposeTime && c.techId === techId ? 'ring-2 ring-coolant/50' : ''}`}
                >
                  <div className="flex flex-wrap items-center justify-between gap-2">
                    <span className="inline-flex items-center gap-2 font-medium">
                      <TechSwatch tech={tech} />
                      {c.name}
                      {initial.proposeTime && c.techId === techId && <span className="text-xs font-normal text-coolant">(chosen)</span>}
                      {c.eligible ? (
                        <span className="inline-flex items-center gap-1 text-xs text-ok">
                          <CheckCircle2 className="size-3.5" aria-hidden="true" /> score {c.score}
                        </span>
                      ) : (
                        <span className="inline-flex items-center gap-1 text-xs text-alarm">
                          <XCircle className="size-3.5" aria-hidden="true" /> not available
                        </span>
                      )}
                    </span>
                    {c.eligible && c.proposedStart && c.proposedEnd && (
                      <Button
                        size="sm"
                        busy={create.isPending}
                        onClick={() => book({ techId: c.techId, startAt: c.proposedStart!, endAt: c.proposedEnd! })}
                      >
                        Book {c.name.split(' ')[0]} at {instantToLocal(c.proposedStart, timeZone).time}
                      </Button>
                    )}
                  </div>
                  <ul className="mt-1 list-disc pl-5 text-xs">
                    {c.reasons.map((r) => (
                      <li key={r}>{r}</li>
                    ))}
                  </ul>
                </li>
              );
            })}
          </ol>
        ) : null}
      </section>
    </div>
  );
}
