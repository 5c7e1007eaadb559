import { useMemo, useState } from 'react';
import { Controller, useForm, type Control } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { psiToKpa } from '@coilpath/calc';
import { feetToMetres, metresToFeet } from '@coilpath/contract/measure';
import { branchInputSchema, invitationInputSchema, skillSuggestions, userProfileSchema } from '@coilpath/contract/team';
import { epa608Labels, epa608Types, roleLabels, roles, weekdays } from '@coilpath/contract/vocabulary';
import type { BranchDetail, BranchInput, BranchValues, InvitationInput, UserProfile, UserRow, WorkingHours } from '@coilpath/contract';
import { api } from '@/lib/api-client';
import { Button } from '@/components/ui/button';
import { SelectField, TextAreaField, TextField } from '@/components/ui/field';
import { useNotify } from '@/components/ui/notices';
import { useBranch } from '@/lib/branch';
import { applyServerErrors } from '@/lib/form-errors';

/**
 * The branch's elevation, kept in metres (the schema's `elevationMeters`) and typed in feet for an
 * imperial branch: what is typed is kept as text while typing, and the field holds the metres.
 */
function ElevationField({
  control,
  imperial,
  error,
}: {
  control: Control<BranchInput, unknown, BranchValues>;
  imperial: boolean;
  error: string | undefined;
}) {
  return (
    <Controller
      control={control}
      name="elevationMeters"
      render={({ field }) => (
        <ElevationInput
          metres={field.value as number | string | undefined}
          onChange={field.onChange}
          onBlur={field.onBlur}
          imperial={imperial}
          error={error}
        />
      )}
    />
  );
}

function ElevationInput({
  metres,
  onChange,
  onBlur,
  imperial,
  error,
}: {
  metres: number | string | undefined;
  onChange: (v: number | string) => void;
  onBlur: () => void;
  imperial: boolean;
  error: string | undefined;
}) {
  const shown = (m: number | string | undefined) => {
    const n = Number(m ?? 0);
    return typeof m === 'string' || !Number.isFinite(n) ? String(m ?? '') : String(Math.round((imperial ? metresToFeet(n) : n) * 10) / 10);
  };
  const [text, setText] = useState(() => shown(metres));
  const [unit, setUnit] = useState(imperial);
  if (unit !== imperial) {
    // The unit system changed: show the same elevation in the other unit.
    setUnit(imperial);
    setText(shown(metres));
  }
  return (
    <TextField
      label={imperial ? 'Elevation (ft above sea level)' : 'Elevation (m above sea level)'}
      inputMode="decimal"
      value={text}
      onBlur={onBlur}
      onChange={(ev: { target: { value: string } }) => {
        const t = ev.target.value;
        setText(t);
        const n = t.trim() === '' ? 0 : Number(t);
        // Not a number: handed on as typed, so the schema refuses it with its message.
        onChange(Number.isFinite(n) ? (imperial ? feetToMetres(n) : n) : t);
      }}
      error={error}
      hint={
        imperial && Number.isFinite(Number(metres))
          ? `= ${Math.round(Number(metres))} m. Gauge readings are corrected with the standard atmosphere there (0 = sea level).`
          : 'Gauge readings are corrected with the standard atmosphere there (0 = sea level).'
      }
    />
  );
}

const num = { setValueAs: (v: unknown) => (v === '' || v === null || v === undefined ? undefined : Number(v)) };
const dayNames: Record<(typeof weekdays)[number], string> = {
  sun: 'Sunday',
  mon: 'Monday',
  tue: 'Tuesday',
  wed: 'Wednesday',
  thu: 'Thursday',
  fri: 'Friday',
  sat: 'Saturday',
};

export const standardHours: WorkingHours = {
  sun: null,
  mon: { start: '07:00', end: '15:30' },
  tue: { start: '07:00', end: '15:30' },
  wed: { start: '07:00', end: '15:30' },
  thu: { start: '07:00', end: '15:30' },
  fri: { start: '07:00', end: '15:30' },
  sat: null,
};

function FormFooter({ busy, label, onCancel, error }: { busy: boolean; label: string; onCancel: () => void; error: string | null }) {
  return (
    <>
      {error && (
        <p role="alert" className="rounded-md bg-alarm-tint px-3 py-2 text-sm text-alarm">
          {error}
        </p>
      )}
      <div className="flex flex-wrap justify-end gap-2 border-t border-slate-line pt-4">
        <Button variant="secondary" onClick={onCancel}>
          Cancel
        </Button>
        <Button type="submit" busy={busy}>
          {label}
        </Button>
      </div>
    </>
  );
}

/** Working hours per weekday: a day off, or a start and an end (24-hour, branch time). */
function WorkingHoursField({ control, errors }: { control: Control<PersonForm, unknown, PersonValues>; errors: unknown }) {
  const errs = errors as Partial<Record<string, { end?: { message?: string }; start?: { message?: string } }>> | undefined;
  return (
    <Controller
      control={control}
      name="profile.workingHours"
      render={({ field }) => {
        const value = (field.value ?? null) as WorkingHours | null;
        const hours = value ?? standardHours;
        const setDay = (d: (typeof weekdays)[number], v: { start: string; end: string } | null) => field.onChange({ ...hours, [d]: v });
        return (
          <fieldset className="flex flex-col gap-2">
            <legend className="mb-1 text-sm font-semibold">Working hours (branch time)</legend>
            <label className="flex items-center gap-2 text-sm">
              <input
                type="checkbox"
                className="size-4"
                checked={value !== null}
                onChange={(e) => field.onChange(e.target.checked ? standardHours : null)}
              />
              Bookable on the Roster with these hours
            </label>
            {value !== null &&
              weekdays.map((d) => {
                const day = hours[d];
                return (
                  <div key={d} className="grid grid-cols-[7rem_auto_1fr_1fr] items-center gap-2 text-sm">
                    <span>{dayNames[d]}</span>
                    <label className="flex items-center gap-1">
                      <input
                        type="checkbox"
                        className="size-4"
                        checked={day !== null}
                        onChange={(e) => setDay(d, e.target.checked ? { start: '07:00', end: '15:30' } : null)}
                      />
                      <span className="sr-only">Works on {dayNames[d]}</span>
                    </label>
                    {day ? (
                      <>
                        <input
                          aria-label={`${dayNames[d]} start`}
                          type="time"
                          className="min-h-11 rounded-md border border-slate-line px-2"
                          value={day.start}
                          onChange={(e) => setDay(d, { ...day, start: e.target.value })}
                        />
                        <input
                          aria-label={`${dayNames[d]} end`}
                          type="time"
                          className="min-h-11 rounded-md border border-slate-line px-2"
                          value={day.end}
                          onChange={(e) => setDay(d, { ...day, end: e.target.value })}
                        />
                      </>
                    ) : (
                      <span className="col-span-2 text-slate">Day off</span>
                    )}
                    {(errs?.[d]?.end?.message || errs?.[d]?.start?.message) && (
                      <span className="col-span-4 text-alarm">{errs?.[d]?.end?.message ?? errs?.[d]?.start?.message}</span>
                    )}
                  </div>
                );
              })}
          </fieldset>
        );
      }}
    />
  );
}

type PersonForm = InvitationInput;
type PersonValues = { email?: string; profile: UserProfile };
const editSchema = z.object({ email: z.string().optional(), profile: userProfileSchema });

/** Invite someone (with an e-mail) or edit a person's profile: role, branch, skills, EPA 608, hours, start. */
export function PersonForm({ person, onDone }: { person?: UserRow; onDone: () => void }) {
  const notify = useNotify();
  const qc = useQueryClient();
  const { branches, branchId } = useBranch();
  const [error, setError] = useState<string | null>(null);
  const form = useForm<PersonForm, unknown, PersonValues>({
    resolver: zodResolver(person ? editSchema : invitationInputSchema) as never,
    defaultValues: {
      email: person?.email ?? '',
      profile: {
        name: person?.name ?? '',
        role: person?.role ?? 'technician',
        branchId: person ? person.branchId : (branchId ?? null),
        phone: person?.phone ?? '',
        skills: person?.skills ?? [],
        epa608Type: person?.epa608Type ?? 'none',
        epa608Number: person?.epa608Number ?? '',
        workingHours: person ? person.workingHours : standardHours,
        startAddress: person?.startAddress ?? '',
        startLat: person?.startLat ?? undefined,
        startLon: person?.startLon ?? undefined,
      },
    },
  });
  const e = form.formState.errors.profile;
  const role = form.watch('profile.role');
  const epa = form.watch('profile.epa608Type');
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      if (person) {
        const saved = await api.patch<UserRow>(`/api/users/${person.id}`, values.profile, { check: 'userRowSchema' });
        notify(`Saved ${saved.name}.`);
      } else {
        await api.post('/api/invitations', values, { check: 'invitationRowSchema' });
        notify(`Invitation sent to ${values.email}. The link works once, for 72 hours.`);
      }
      await Promise.all([qc.invalidateQueries({ queryKey: ['users'] }), qc.invalidateQueries({ queryKey: ['invitations'] })]);
      onDone();
    } catch (err) {
      setError(applyServerErrors(form as never, err));
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      {!person && (
        <TextField
          label="E-mail"
          type="email"
          inputMode="email"
          {...form.register('email')}
          error={form.formState.errors.email?.message}
          hint="The invitation link goes to this address."
        />
      )}
      <div className="grid gap-4 sm:grid-cols-3">
        <TextField label="Name" {...form.register('profile.name')} error={e?.name?.message} />
        <SelectField
          label="Role"
          {...form.register('profile.role', {
            onChange: (ev: { target: { value: string } }) => ev.target.value === 'owner' && form.setValue('profile.branchId', null),
          })}
          error={e?.role?.message}
        >
          {roles.map((r) => (
            <option key={r} value={r}>
              {roleLabels[r]}
            </option>
          ))}
        </SelectField>
        <SelectField
          label="Branch"
          disabled={role === 'owner'}
          {...form.register('profile.branchId', { setValueAs: (v: unknown) => (v ? v : null) })}
          error={e?.branchId?.message}
          hint={role === 'owner' ? 'Owners see every branch.' : undefined}
        >
          <option value="">{role === 'owner' ? 'Every branch' : 'Choose the branch…'}</option>
          {branches.map((b) => (
            <option key={b.id} value={b.id}>
              {b.name}
            </option>
          ))}
        </SelectField>
      </div>
      <div className="grid gap-4 sm:grid-cols-3">
        <TextField label="Phone" type="tel" {...form.register('profile.phone')} error={e?.phone?.message} />
        <SelectField label="EPA 608 certification" {...form.register('profile.epa608Type')} error={e?.epa608Type?.message}>
          {epa608Types.map((t) => (
            <option key={t} value={t}>
              {epa608Labels[t]}
            </option>
          ))}
        </SelectField>
        <TextField
          label="Certification number"
          disabled={epa === 'none'}
          {...form.register('profile.epa608Number')}
          error={e?.epa608Number?.message}
        />
      </div>
      <Controller
        control={form.control}
        name="profile.skills"
        render={({ field }) => <SkillsField value={(field.value as string[] | undefined) ?? []} onChange={field.onChange} />}
      />
      {role === 'technician' && <WorkingHoursField control={form.control} errors={e?.workingHours} />}
      {role === 'technician' && (
        <fieldset className="grid gap-4 sm:grid-cols-3">
          <legend className="mb-2 text-sm font-semibold">Start location (where the day’s route begins)</legend>
          <TextField label="Address" {...form.register('profile.startAddress')} error={e?.startAddress?.message} />
          <TextField label="Latitude (°)" inputMode="decimal" {...form.register('profile.startLat', num)} error={e?.startLat?.message} />
          <TextField label="Longitude (°)" inputMode="decimal" {...form.register('profile.startLon', num)} error={e?.startLon?.message} />
        </fieldset>
      )}
      <FormFooter busy={form.formState.isSubmitting} label={person ? 'Save' : 'Send invitation'} onCancel={onDone} error={error} />
    </form>
  );
}

function SkillsField({ value, onChange }: { value: string[]; onChange: (v: string[]) => void }) {
  const [text, setText] = useState(value.join(', '));
  return (
    <div className="flex flex-col gap-1">
      <TextField
        label="Skills"
        list="coilpath-skills"
        value={text}
        onChange={(ev) => {
          setText(ev.target.value);
          onChange(
            ev.target.value
              .split(',')
              .map((s) => s.trim())
              .filter(Boolean),
          );
        }}
        hint={`Separate with commas, e.g. ${skillSuggestions.slice(0, 3).join(', ')}. The Roster matches work that needs a skill.`}
      />
      <datalist id="coilpath-skills">
        {skillSuggestions.map((s) => (
          <option key={s} value={s} />
        ))}
      </datalist>
    </div>
  );
}

// ---------------------------------------------------------------------------------------------

function useTimeZones(): string[] {
  return useMemo(() => {
    try {
      return (Intl as unknown as { supportedValuesOf(k: string): string[] }).supportedValuesOf('timeZone');
    } catch {
      return ['America/New_York', 'America/Chicago', 'America/Denver', 'America/Phoenix', 'America/Los_Angeles'];
    }
  }, []);
}

/** A branch: name, code, time zone, base, holidays, labour rate, and the thresholds the calculations use. */
export function BranchForm({ branch, onDone }: { branch?: BranchDetail; onDone: () => void }) {
  const notify = useNotify();
  const qc = useQueryClient();
  const zones = useTimeZones();
  const [error, setError] = useState<string | null>(null);
  const form = useForm<BranchInput, unknown, BranchValues>({
    resolver: zodResolver(branchInputSchema),
    defaultValues: branch ?? {
      name: '',
      code: '',
      timeZone: '',
      baseAddress: '',
      holidays: [],
      labourRate: 95,
      currency: 'USD',
      unitSystem: 'imperial',
      elevationMeters: 0,
      sensorTolerancePercent: 3,
      sensorToleranceAbsolute: 5,
      repeatAlarmCount: 2,
      repeatAlarmDays: 30,
      callbackWindowDays: 30,
      inspectionDueDays: 30,
      tradingName: '',
      officeAddress: '',
      officePhone: '',
      licenceNumber: '',
      officeEmail: '',
    },
  });
  const e = form.formState.errors;
  // Kept in psi; an SI branch's Visit screen compares in kPa, so say what that is.
  const [unitSystem, toleranceAbsolute] = form.watch(['unitSystem', 'sensorToleranceAbsolute']);
  const siTolerance =
    unitSystem === 'si' && Number.isFinite(Number(toleranceAbsolute))
      ? `= ${(Math.round(psiToKpa(Number(toleranceAbsolute)) * 10) / 10).toFixed(1)} kPa on the Visit screen`
      : undefined;
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      const saved = branch
        ? await api.patch<BranchDetail>(`/api/branches/${branch.id}`, values, { check: 'branchDetailSchema' })
        : await api.post<BranchDetail>('/api/branches', values, { check: 'branchDetailSchema' });
      await qc.invalidateQueries({ queryKey: ['branches'] });
      notify(branch ? `Saved ${saved.name}.` : `Added branch ${saved.name} (${saved.timeZone}).`);
      onDone();
    } catch (err) {
      setError(applyServerErrors(form as never, err));
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      <div className="grid gap-4 sm:grid-cols-3">
        <TextField label="Name" {...form.register('name')} error={e.name?.message} />
        <TextField label="Code" hint="2–8 letters, e.g. DEN" {...form.register('code')} error={e.code?.message} />
        <TextField
          label="Time zone (IANA)"
          list="coilpath-zones"
          placeholder="America/Denver"
          {...form.register('timeZone')}
          error={e.timeZone?.message}
        />
        <datalist id="coilpath-zones">
          {zones.map((z) => (
            <option key={z} value={z} />
          ))}
        </datalist>
      </div>
      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-2 text-sm font-semibold">Base (where routes start by default)</legend>
        <TextField label="Address" {...form.register('baseAddress')} error={e.baseAddress?.message} />
        <TextField label="Latitude (°)" inputMode="decimal" {...form.register('baseLat', num)} error={e.baseLat?.message} />
        <TextField label="Longitude (°)" inputMode="decimal" {...form.register('baseLon', num)} error={e.baseLon?.message} />
      </fieldset>
      <div className="grid gap-4 sm:grid-cols-3">
        <TextField label="Labour rate per hour" inputMode="decimal" {...form.register('labourRate', num)} error={e.labourRate?.message} />
        <TextField label="Currency" {...form.register('currency')} error={e.currency?.message} />
        <SelectField
          label="Units of readings"
          hint="Pressures and temperatures on the Visit screen, briefings, Unit files and service summaries. Refrigerant stays in lb."
          {...form.register('unitSystem')}
          error={e.unitSystem?.message}
        >
          <option value="imperial">psig and °F</option>
          <option value="si">kPa(g) and °C</option>
        </SelectField>
        <ElevationField control={form.control} imperial={unitSystem !== 'si'} error={e.elevationMeters?.message} />
      </div>
      <Controller
        control={form.control}
        name="holidays"
        render={({ field }) => (
          <HolidaysField
            value={(field.value as string[] | undefined) ?? []}
            onChange={field.onChange}
            error={e.holidays?.message ?? e.holidays?.[0]?.message}
          />
        )}
      />
      <fieldset className="grid gap-4 sm:grid-cols-2">
        <legend className="mb-2 text-sm font-semibold">On the customer’s service summary</legend>
        <TextField label="Trading name" hint="Blank: the branch’s name" {...form.register('tradingName')} error={e.tradingName?.message} />
        <TextField label="Licence number" {...form.register('licenceNumber')} error={e.licenceNumber?.message} />
        <TextField
          label="Office address"
          autoComplete="street-address"
          {...form.register('officeAddress')}
          error={e.officeAddress?.message}
        />
        <TextField label="Office phone" type="tel" autoComplete="tel" {...form.register('officePhone')} error={e.officePhone?.message} />
        <TextField
          label="Office e-mail"
          type="email"
          autoComplete="email"
          hint="Customers’ replies to a summary go here"
          {...form.register('officeEmail')}
          error={e.officeEmail?.message}
        />
      </fieldset>
      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-2 text-sm font-semibold">Thresholds</legend>
        <TextField
          label="Sensor check tolerance (%)"
          inputMode="decimal"
          {...form.register('sensorTolerancePercent', num)}
          error={e.sensorTolerancePercent?.message}
          hint="Controller vs reference gauge"
        />
        <TextField
          label="Sensor check tolerance (psi)"
          inputMode="decimal"
          {...form.register('sensorToleranceAbsolute', num)}
          error={e.sensorToleranceAbsolute?.message}
          hint={siTolerance}
        />
        <TextField
          label="Callback window (days)"
          inputMode="numeric"
          {...form.register('callbackWindowDays', num)}
          error={e.callbackWindowDays?.message}
        />
        <TextField
          label="Model-alert inspections due within (days)"
          inputMode="numeric"
          {...form.register('inspectionDueDays', num)}
          error={e.inspectionDueDays?.message}
        />
        <TextField
          label="Repeat alarm: same code N times"
          inputMode="numeric"
          {...form.register('repeatAlarmCount', num)}
          error={e.repeatAlarmCount?.message}
        />
        <TextField
          label="…within M days"
          inputMode="numeric"
          {...form.register('repeatAlarmDays', num)}
          error={e.repeatAlarmDays?.message}
        />
      </fieldset>
      <FormFooter busy={form.formState.isSubmitting} label={branch ? 'Save branch' : 'Add branch'} onCancel={onDone} error={error} />
    </form>
  );
}

function HolidaysField({ value, onChange, error }: { value: string[]; onChange: (v: string[]) => void; error?: string | undefined }) {
  const [text, setText] = useState(value.join('\n'));
  return (
    <TextAreaField
      label="Holidays (no planned work)"
      hint="One date per line, YYYY-MM-DD"
      value={text}
      error={error}
      onChange={(ev) => {
        setText(ev.target.value);
        onChange(
          ev.target.value
            .split(/[\s,]+/)
            .map((s) => s.trim())
            .filter(Boolean),
        );
      }}
    />
  );
}
