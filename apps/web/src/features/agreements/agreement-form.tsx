import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { addDays } from '@coilpath/calc';
import {
  agreementInputSchema,
  buildAgreementRrule,
  describeAgreementRrule,
  recurrencePresetLabels,
  recurrencePresets,
} from '@coilpath/contract/agreements';
import type { AgreementDetail, UnitChoice } from '@coilpath/contract';
import type { z } from 'zod';
import { ApiError, errorMessage } from '@/lib/api-client';
import { todayInZone } from '@/lib/format';
import { Button } from '@/components/ui/button';
import { SelectField, TextAreaField, TextField } from '@/components/ui/field';
import { Card } from '@/components/ui/page';
import { useNotify } from '@/components/ui/notices';
import { useUnitChoices } from '@/lib/unit-choices';
import { useCreateAgreement } from './api';

type In = z.input<typeof agreementInputSchema>;
type Out = z.output<typeof agreementInputSchema>;

const months = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];
const defaultTasks = [
  'Replace filters',
  'Check belts and bearings',
  'Clean condenser coil',
  'Check refrigerant pressures against the manufacturer’s chart',
  'Test safeties and controls',
];

/** New maintenance agreement: site, covered units, recurrence (built into an RFC 5545 rule), term, SLA, price, tasks. */
export function AgreementForm({
  branchId,
  timeZone,
  onCreated,
  onCancel,
}: {
  branchId: string | undefined;
  timeZone: string;
  onCreated: (a: AgreementDetail) => void;
  onCancel: () => void;
}) {
  const notify = useNotify();
  const units = useUnitChoices(branchId);
  const create = useCreateAgreement();
  const today = todayInZone(timeZone);
  const { register, handleSubmit, formState, setValue, watch, setError } = useForm<In, unknown, Out>({
    resolver: zodResolver(agreementInputSchema),
    defaultValues: {
      name: 'Quarterly planned maintenance',
      unitIds: [],
      recurrence: { preset: 'quarterly', startMonth: Number(today.slice(5, 7)), dayOfMonth: 15, springMonth: 4, autumnMonth: 10 },
      termStart: today,
      termEnd: addDays(addDays(today, 365), -1),
      slaHours: 4,
      priceCents: 360_000,
      visitMinutes: 120,
      tasks: defaultTasks,
    },
  });
  const e = formState.errors;
  const siteId = watch('siteId');
  const recurrence = watch('recurrence');
  const unitIds = watch('unitIds') ?? [];
  const [price, setPrice] = useState('3600');
  const [tasksText, setTasksText] = useState(defaultTasks.join('\n'));

  const sites = useMemo(() => {
    const m = new Map<string, { id: string; name: string; units: UnitChoice[] }>();
    for (const u of units.data ?? []) {
      const s = m.get(u.siteId) ?? { id: u.siteId, name: u.siteName, units: [] };
      s.units.push(u);
      m.set(u.siteId, s);
    }
    return [...m.values()];
  }, [units.data]);
  const site = sites.find((s) => s.id === siteId);
  const rulePreview = (() => {
    try {
      return recurrence?.preset
        ? buildAgreementRrule({ startMonth: 1, dayOfMonth: 15, springMonth: 4, autumnMonth: 10, ...recurrence } as Out['recurrence'])
        : '';
    } catch {
      return '';
    }
  })();

  const submit = handleSubmit((body) =>
    create.mutateAsync(body).then(
      (a) => {
        notify(`Agreement “${a.name}” for ${a.siteName} saved. Preview its visit plan next.`);
        onCreated(a);
      },
      (err) => {
        if (err instanceof ApiError) for (const [k, v] of Object.entries(err.fieldErrors)) setError(k as keyof In, { message: v });
        setError('root', { message: errorMessage(err) });
      },
    ),
  );
  const num = { valueAsNumber: true } as const;

  return (
    <Card title="New maintenance agreement">
      <form onSubmit={submit} noValidate className="grid gap-4 md:grid-cols-2">
        <TextField label="Name" error={e.name?.message} {...register('name')} />
        <SelectField
          label="Site"
          error={e.siteId?.message}
          disabled={units.isPending}
          {...register('siteId', {
            onChange: (ev: React.ChangeEvent<HTMLSelectElement>) =>
              setValue('unitIds', sites.find((s) => s.id === ev.target.value)?.units.map((u) => u.id) ?? [], {
                shouldValidate: formState.isSubmitted,
              }),
          })}
        >
          <option value="">{units.isPending ? 'Loading sites…' : 'Choose a site…'}</option>
          {sites.map((s) => (
            <option key={s.id} value={s.id}>
              {s.name} ({s.units.length} unit{s.units.length === 1 ? '' : 's'})
            </option>
          ))}
        </SelectField>

        <fieldset className="md:col-span-2">
          <legend className="text-sm font-medium">Covered units</legend>
          {!site ? (
            <p className="text-sm text-slate">Choose a site to list its units.</p>
          ) : (
            <div className="mt-1 grid gap-1 sm:grid-cols-2 lg:grid-cols-3">
              {site.units.map((u) => (
                <label key={u.id} className="flex min-h-11 items-center gap-2 rounded border border-slate-line bg-white px-3 text-sm">
                  <input
                    type="checkbox"
                    className="size-4"
                    checked={unitIds.includes(u.id)}
                    onChange={(ev) =>
                      setValue('unitIds', ev.target.checked ? [...unitIds, u.id] : unitIds.filter((x) => x !== u.id), {
                        shouldValidate: formState.isSubmitted,
                      })
                    }
                  />
                  {u.tag} — {u.make} {u.model}
                </label>
              ))}
            </div>
          )}
          {e.unitIds && <p className="mt-1 text-sm text-alarm">{e.unitIds.message}</p>}
        </fieldset>

        <fieldset className="grid gap-3 rounded-md border border-slate-line p-3 md:col-span-2 md:grid-cols-4">
          <legend className="px-1 text-sm font-medium">Visit recurrence</legend>
          <div className="md:col-span-2">
            <SelectField label="How often" {...register('recurrence.preset')}>
              {recurrencePresets.map((p) => (
                <option key={p} value={p}>
                  {recurrencePresetLabels[p]}
                </option>
              ))}
            </SelectField>
          </div>
          {recurrence?.preset === 'spring_autumn' ? (
            <>
              <SelectField label="Spring cooling start-up" {...register('recurrence.springMonth', num)}>
                {[3, 4, 5, 6].map((m) => (
                  <option key={m} value={m}>
                    {months[m - 1]}
                  </option>
                ))}
              </SelectField>
              <SelectField label="Autumn heating check" {...register('recurrence.autumnMonth', num)}>
                {[9, 10, 11].map((m) => (
                  <option key={m} value={m}>
                    {months[m - 1]}
                  </option>
                ))}
              </SelectField>
            </>
          ) : recurrence?.preset !== 'monthly' ? (
            <SelectField label="First visit month" {...register('recurrence.startMonth', num)}>
              {months.map((m, i) => (
                <option key={m} value={i + 1}>
                  {m}
                </option>
              ))}
            </SelectField>
          ) : null}
          <TextField
            label="Day of the month"
            type="number"
            min={1}
            max={28}
            inputMode="numeric"
            error={e.recurrence?.dayOfMonth?.message}
            hint="1–28; weekends and holidays move to the next working day"
            {...register('recurrence.dayOfMonth', num)}
          />
          <p className="text-xs text-slate md:col-span-4">
            {rulePreview && (
              <>
                {describeAgreementRrule(rulePreview)} · RFC 5545 rule <code>{rulePreview}</code>
              </>
            )}
          </p>
          <div className="md:col-span-4">
            <TextAreaField
              label="Season notes"
              hint="e.g. spring: start-up and coil cleaning before cooling season; autumn: heat exchanger and flue check"
              {...register('seasonNotes')}
            />
          </div>
        </fieldset>

        <TextField label="Term starts" type="date" error={e.termStart?.message} {...register('termStart')} />
        <TextField label="Term ends" type="date" error={e.termEnd?.message} {...register('termEnd')} />
        <TextField
          label="SLA response (hours)"
          type="number"
          inputMode="numeric"
          error={e.slaHours?.message}
          {...register('slaHours', num)}
        />
        <TextField
          label="Minutes per visit"
          type="number"
          inputMode="numeric"
          error={e.visitMinutes?.message}
          {...register('visitMinutes', num)}
        />
        <TextField
          label="Price per term (USD)"
          inputMode="decimal"
          value={price}
          error={e.priceCents?.message}
          onChange={(ev) => {
            setPrice(ev.target.value);
            const n = Number(ev.target.value.replace(/[,\s$]/g, ''));
            setValue('priceCents', Number.isFinite(n) ? Math.round(n * 100) : Number.NaN, { shouldValidate: formState.isSubmitted });
          }}
        />
        <TextAreaField
          label="Tasks per visit (one a line)"
          value={tasksText}
          error={e.tasks?.message ?? (Array.isArray(e.tasks) ? e.tasks.find(Boolean)?.message : undefined)}
          onChange={(ev) => {
            setTasksText(ev.target.value);
            setValue(
              'tasks',
              ev.target.value
                .split('\n')
                .map((s) => s.trim())
                .filter(Boolean),
            );
          }}
        />
        <div className="flex flex-wrap items-center gap-2 md:col-span-2">
          <Button type="submit" busy={formState.isSubmitting}>
            Save agreement
          </Button>
          <Button variant="ghost" onClick={onCancel}>
            Cancel
          </Button>
          {e.root && (
            <p role="alert" className="text-sm text-alarm">
              {e.root.message}
            </p>
          )}
        </div>
      </form>
    </Card>
  );
}
