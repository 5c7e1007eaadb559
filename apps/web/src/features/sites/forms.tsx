import { useState } from 'react';
import { useFieldArray, useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { Plus, Trash2 } from 'lucide-react';
import { listRefrigerants } from '@coilpath/calc';
import { applianceCategories, applianceCategoryLabels, unitKindLabels, unitKinds } from '@coilpath/contract/vocabulary';
import { customerInputSchema, siteInputSchema, unitInputSchema } from '@coilpath/contract/sites';
import type {
  CustomerInput,
  CustomerRow,
  CustomerValues,
  SiteInput,
  SiteRow,
  SiteValues,
  UnitInput,
  UnitRow,
  UnitValues,
} from '@coilpath/contract';
import { api } from '@/lib/api-client';
import { applyServerErrors } from '@/lib/form-errors';
import { Button } from '@/components/ui/button';
import { SelectField, TextAreaField, TextField } from '@/components/ui/field';
import { SafetyNote } from '@/components/ui/page';
import { useNotify } from '@/components/ui/notices';
import { useBranch } from '@/lib/branch';
import { useCustomers, useInvalidateSites } from './api';

function FormError({ message }: { message: string | null }) {
  if (!message) return null;
  return (
    <p role="alert" className="rounded-md bg-alarm-tint px-3 py-2 text-sm text-alarm">
      {message}
    </p>
  );
}

function FormActions({ busy, label, onCancel }: { busy: boolean; label: string; onCancel: () => void }) {
  return (
    <div className="flex flex-wrap justify-end gap-2 border-t border-slate-line pt-4">
      <Button variant="secondary" onClick={onCancel}>
        Cancel
      </Button>
      <Button type="submit" busy={busy}>
        {label}
      </Button>
    </div>
  );
}

const num = { setValueAs: (v: unknown) => (v === '' || v === null || v === undefined ? undefined : Number(v)) };

// ---------------------------------------------------------------------------------------------

export function CustomerForm({ customer, onDone }: { customer?: CustomerRow; onDone: (c: CustomerRow | null) => void }) {
  const notify = useNotify();
  const invalidate = useInvalidateSites();
  const { branches, branchId, canSwitch } = useBranch();
  const [error, setError] = useState<string | null>(null);
  const form = useForm<CustomerInput, unknown, CustomerValues>({
    resolver: zodResolver(customerInputSchema),
    defaultValues: {
      branchId: customer?.branchId ?? branchId ?? null,
      name: customer?.name ?? '',
      contactName: customer?.contactName ?? '',
      contactEmail: customer?.contactEmail ?? '',
      contactPhone: customer?.contactPhone ?? '',
      billingAddress: customer?.billingAddress ?? '',
      notes: customer?.notes ?? '',
    },
  });
  const e = form.formState.errors;
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      const saved = customer
        ? await api.patch<CustomerRow>(`/api/customers/${customer.id}`, { ...values, branchId: undefined }, { check: 'customerRowSchema' })
        : await api.post<CustomerRow>('/api/customers', values, { check: 'customerRowSchema' });
      await invalidate();
      notify(customer ? `Saved ${saved.name}.` : `Added customer ${saved.name}.`);
      onDone(saved);
    } catch (err) {
      setError(applyServerErrors(form, err));
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      {canSwitch && !customer && (
        <SelectField label="Branch" {...form.register('branchId')} error={e.branchId?.message}>
          <option value="">Choose the branch…</option>
          {branches.map((b) => (
            <option key={b.id} value={b.id}>
              {b.name}
            </option>
          ))}
        </SelectField>
      )}
      <TextField label="Customer name" {...form.register('name')} error={e.name?.message} />
      <div className="grid gap-4 sm:grid-cols-3">
        <TextField label="Contact name" {...form.register('contactName')} error={e.contactName?.message} />
        <TextField label="Contact e-mail" type="email" {...form.register('contactEmail')} error={e.contactEmail?.message} />
        <TextField label="Contact phone" type="tel" {...form.register('contactPhone')} error={e.contactPhone?.message} />
      </div>
      <TextField label="Billing address" {...form.register('billingAddress')} error={e.billingAddress?.message} />
      <TextAreaField label="Notes" {...form.register('notes')} error={e.notes?.message} />
      <FormError message={error} />
      <FormActions busy={form.formState.isSubmitting} label={customer ? 'Save customer' : 'Add customer'} onCancel={() => onDone(null)} />
    </form>
  );
}

// ---------------------------------------------------------------------------------------------

export function SiteForm({ site, onDone }: { site?: SiteRow; onDone: (s: SiteRow | null) => void }) {
  const notify = useNotify();
  const invalidate = useInvalidateSites();
  const { branchId } = useBranch();
  const [error, setError] = useState<string | null>(null);
  const customers = useCustomers({ branchId: site?.branchId ?? branchId, pageSize: 200, sort: 'name', status: 'active' });
  const form = useForm<SiteInput, unknown, SiteValues>({
    resolver: zodResolver(siteInputSchema),
    defaultValues: {
      customerId: site?.customerId ?? '',
      name: site?.name ?? '',
      address: site?.address ?? '',
      city: site?.city ?? '',
      region: site?.region ?? '',
      postalCode: site?.postalCode ?? '',
      lat: site?.lat,
      lon: site?.lon,
      accessNotes: site?.accessNotes ?? '',
      contactName: site?.contactName ?? '',
      contactEmail: site?.contactEmail ?? '',
      contactPhone: site?.contactPhone ?? '',
    },
  });
  const e = form.formState.errors;
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      const saved = site
        ? await api.patch<SiteRow>(`/api/sites/${site.id}`, values, { check: 'siteRowSchema' })
        : await api.post<SiteRow>('/api/sites', values, { check: 'siteRowSchema' });
      await invalidate();
      notify(site ? `Saved ${saved.name}.` : `Added site ${saved.name} for ${saved.customerName}.`);
      onDone(saved);
    } catch (err) {
      setError(applyServerErrors(form, err));
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      <SelectField
        label="Customer"
        {...form.register('customerId')}
        error={e.customerId?.message}
        hint={customers.data && customers.data.rows.length === 0 ? 'No customers yet in this branch: add the customer first.' : undefined}
      >
        <option value="">{customers.isPending ? 'Loading customers…' : 'Choose the customer…'}</option>
        {customers.data?.rows.map((c) => (
          <option key={c.id} value={c.id}>
            {c.name}
            {branchId ? '' : ` (${c.branchName})`}
          </option>
        ))}
      </SelectField>
      <TextField label="Site name" {...form.register('name')} error={e.name?.message} />
      <TextField label="Street address" autoComplete="street-address" {...form.register('address')} error={e.address?.message} />
      <div className="grid gap-4 sm:grid-cols-3">
        <TextField label="City" {...form.register('city')} error={e.city?.message} />
        <TextField label="State or region" {...form.register('region')} error={e.region?.message} />
        <TextField label="Postal code" {...form.register('postalCode')} error={e.postalCode?.message} />
      </div>
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField
          label="Latitude (°)"
          inputMode="decimal"
          {...form.register('lat', num)}
          error={e.lat?.message}
          hint="Decimal degrees, e.g. 39.7392"
        />
        <TextField
          label="Longitude (°)"
          inputMode="decimal"
          {...form.register('lon', num)}
          error={e.lon?.message}
          hint="West is negative, e.g. -104.9903"
        />
      </div>
      <TextAreaField
        label="Access notes"
        hint="Keys, roof access, parking, check-in — what a technician needs on arrival."
        {...form.register('accessNotes')}
        error={e.accessNotes?.message}
      />
      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-2 text-sm font-semibold">Site contact (receives service summaries)</legend>
        <TextField label="Name" {...form.register('contactName')} error={e.contactName?.message} />
        <TextField label="E-mail" type="email" {...form.register('contactEmail')} error={e.contactEmail?.message} />
        <TextField label="Phone" type="tel" {...form.register('contactPhone')} error={e.contactPhone?.message} />
      </fieldset>
      <FormError message={error} />
      <FormActions busy={form.formState.isSubmitting} label={site ? 'Save site' : 'Add site'} onCancel={() => onDone(null)} />
    </form>
  );
}

// ---------------------------------------------------------------------------------------------

const refrigerants = listRefrigerants();

export function UnitForm({ siteId, unit, onDone }: { siteId: string; unit?: UnitRow; onDone: (u: UnitRow | null) => void }) {
  const notify = useNotify();
  const invalidate = useInvalidateSites();
  const [error, setError] = useState<string | null>(null);
  const form = useForm<UnitInput, unknown, UnitValues>({
    resolver: zodResolver(unitInputSchema),
    defaultValues: {
      siteId,
      tag: unit?.tag ?? '',
      kind: unit?.kind ?? 'rooftop_unit',
      make: unit?.make ?? '',
      model: unit?.model ?? '',
      serial: unit?.serial ?? '',
      installDate: unit?.installDate ?? '',
      warrantyEnd: unit?.warrantyEnd ?? '',
      refrigerant: unit?.refrigerant ?? 'R-410A',
      fullChargeLb: unit?.fullChargeLb,
      applianceCategory: unit?.applianceCategory ?? 'comfort_cooling',
      tonnage: unit?.tonnage ?? '',
      notes: unit?.notes ?? '',
      circuits: unit?.circuits.map((c) => ({ number: c.number, compressorCount: c.compressorCount, chargeLb: c.chargeLb ?? '' })) ?? [
        { number: 1, compressorCount: 1, chargeLb: '' },
      ],
    },
  });
  const circuits = useFieldArray({ control: form.control, name: 'circuits' });
  const e = form.formState.errors;
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      const saved = unit
        ? await api.put<UnitRow>(`/api/units/${unit.id}`, { ...values, siteId: undefined }, { check: 'unitRowSchema' })
        : await api.post<UnitRow>('/api/units', values, { check: 'unitRowSchema' });
      await invalidate();
      notify(unit ? `Saved ${saved.tag}.` : `Added ${saved.tag} (${saved.make} ${saved.model}).`);
      onDone(saved);
    } catch (err) {
      setError(applyServerErrors(form, err));
    }
  });
  const nextNumber = () => {
    const used = new Set(form.getValues('circuits').map((c) => Number(c.number)));
    for (let i = 1; i <= 8; i++) if (!used.has(i)) return i;
    return 8;
  };
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      <div className="grid gap-4 sm:grid-cols-3">
        <TextField label="Tag" hint="The site's label, e.g. RTU-3" {...form.register('tag')} error={e.tag?.message} />
        <SelectField label="Kind" {...form.register('kind')} error={e.kind?.message}>
          {unitKinds.map((k) => (
            <option key={k} value={k}>
              {unitKindLabels[k]}
            </option>
          ))}
        </SelectField>
        <SelectField label="Appliance category (leak rules)" {...form.register('applianceCategory')} error={e.applianceCategory?.message}>
          {applianceCategories.map((c) => (
            <option key={c} value={c}>
              {applianceCategoryLabels[c]}
            </option>
          ))}
        </SelectField>
      </div>
      <div className="grid gap-4 sm:grid-cols-3">
        <TextField label="Make" {...form.register('make')} error={e.make?.message} />
        <TextField label="Model" {...form.register('model')} error={e.model?.message} />
        <TextField label="Serial number" {...form.register('serial')} error={e.serial?.message} />
      </div>
      <div className="grid gap-4 sm:grid-cols-4">
        <TextField label="Install date" type="date" {...form.register('installDate')} error={e.installDate?.message} />
        <TextField label="Warranty end" type="date" {...form.register('warrantyEnd')} error={e.warrantyEnd?.message} />
        <SelectField label="Refrigerant" {...form.register('refrigerant')} error={e.refrigerant?.message}>
          {refrigerants.map((r) => (
            <option key={r.id} value={r.id}>
              {r.id} ({r.safetyGroup})
            </option>
          ))}
        </SelectField>
        <TextField label="Full charge (lb)" inputMode="decimal" {...form.register('fullChargeLb', num)} error={e.fullChargeLb?.message} />
      </div>
      <TextField
        label="Nominal tons (optional)"
        inputMode="decimal"
        className="sm:max-w-48"
        {...form.register('tonnage')}
        error={e.tonnage?.message}
      />
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 text-sm font-semibold">Circuits</legend>
        {circuits.fields.map((c, i) => (
          <div key={c.id} className="grid grid-cols-[5rem_1fr_1fr_auto] items-end gap-2">
            <TextField label="Circuit" readOnly inputMode="numeric" {...form.register(`circuits.${i}.number`, num)} />
            <TextField
              label="Compressors"
              inputMode="numeric"
              {...form.register(`circuits.${i}.compressorCount`, num)}
              error={e.circuits?.[i]?.compressorCount?.message}
            />
            <TextField
              label="Charge (lb, optional)"
              inputMode="decimal"
              {...form.register(`circuits.${i}.chargeLb`)}
              error={e.circuits?.[i]?.chargeLb?.message}
            />
            <Button
              variant="ghost"
              aria-label={`Remove circuit ${i + 1}`}
              disabled={circuits.fields.length === 1}
              onClick={() => circuits.remove(i)}
            >
              <Trash2 className="size-4" aria-hidden="true" />
            </Button>
          </div>
        ))}
        {e.circuits?.message && <p className="text-sm text-alarm">{e.circuits.message}</p>}
        <div>
          <Button
            variant="secondary"
            size="sm"
            disabled={circuits.fields.length >= 8}
            onClick={() => circuits.append({ number: nextNumber(), compressorCount: 1, chargeLb: '' })}
          >
            <Plus className="size-4" aria-hidden="true" /> Add circuit
          </Button>
        </div>
      </fieldset>
      <TextAreaField label="Notes" {...form.register('notes')} error={e.notes?.message} />
      <SafetyNote>
        Take the full charge from the unit’s nameplate or the manufacturer’s data; leak-rate deadlines are computed from it.
      </SafetyNote>
      <FormError message={error} />
      <FormActions busy={form.formState.isSubmitting} label={unit ? 'Save unit' : 'Add unit'} onCancel={() => onDone(null)} />
    </form>
  );
}
