import { z } from 'zod';
import {
  base64FileSchema,
  idSchema,
  pickedIdSchema,
  isoDateSchema,
  latitudeSchema,
  limits,
  longitudeSchema,
  oneLine,
  oneOfCsvOrFile,
  oneOfCsvOrFileMessage,
  optionalOneLine,
  pageQuerySchema,
} from './common';
import { temperatureUnitSchema } from './measure-schemas';
import { circuitTargetKinds, targetRangeLimits, type CircuitTargets } from './target-range';
import { applianceCategorySchema, unitKindSchema } from './vocabulary-schemas';

/** Optional free text: blank input becomes `null`, so forms can send empty fields. */
const optionalText = (max: number = limits.shortText) =>
  z
    .string()
    .trim()
    .max(max, `At most ${max} characters`)
    .nullish()
    .transform((v) => (v ? v : null));

/** A required one-line field (names, addresses, make, model, serial). */
const requiredText = (what: string, max: number = limits.shortText) => oneLine(max, `Enter ${what}`);

const optionalEmail = z
  .string()
  .trim()
  .max(limits.email)
  .nullish()
  .transform((v) => (v ? v.toLowerCase() : null))
  .refine((v) => v === null || z.email().safeParse(v).success, 'Enter a valid e-mail address');

const optionalDate = z
  .union([isoDateSchema, z.literal('')])
  .nullish()
  .transform((v) => (v ? v : null));

/** Which records a list shows: the usual ones, the archived ones, or both. */
export const recordStatusSchema = z.enum(['active', 'archived', 'all']);
export type RecordStatus = z.infer<typeof recordStatusSchema>;

// ---------------------------------------------------------------------------------------------
// Customers
// ---------------------------------------------------------------------------------------------

export const customerInputSchema = z.object({
  /** Required from the owner (who sees every branch); others always create in their own branch. */
  branchId: idSchema.nullish(),
  name: requiredText('the customer name', limits.name),
  contactName: optionalOneLine(limits.name),
  contactEmail: optionalEmail,
  contactPhone: optionalOneLine(40),
  billingAddress: optionalText(),
  notes: optionalText(limits.longText),
});
export type CustomerInput = z.input<typeof customerInputSchema>;
export type CustomerValues = z.output<typeof customerInputSchema>;
export const customerPatchSchema = customerInputSchema.omit({ branchId: true }).partial();

export const customersQuerySchema = pageQuerySchema.extend({
  branchId: idSchema.optional(),
  status: recordStatusSchema.default('active'),
});

export interface CustomerRow {
  id: string;
  branchId: string;
  branchName: string;
  name: string;
  contactName: string | null;
  contactEmail: string | null;
  contactPhone: string | null;
  billingAddress: string | null;
  notes: string | null;
  siteCount: number;
  archivedAt: string | null;
}
export const customerSortKeys = ['name', 'contactName', 'siteCount', 'branchName'] as const;

// ---------------------------------------------------------------------------------------------
// Sites
// ---------------------------------------------------------------------------------------------

export const siteInputSchema = z.object({
  customerId: pickedIdSchema('a customer'),
  name: requiredText('the site name', limits.name),
  address: requiredText('the street address'),
  city: oneLine(limits.name).default(''),
  region: oneLine(limits.name).default(''),
  postalCode: oneLine(20).default(''),
  lat: z.coerce.number({ message: 'Enter the latitude in degrees' }).pipe(latitudeSchema),
  lon: z.coerce.number({ message: 'Enter the longitude in degrees' }).pipe(longitudeSchema),
  accessNotes: optionalText(limits.longText),
  /** Who receives the service summaries. */
  contactName: optionalOneLine(limits.name),
  contactEmail: optionalEmail,
  contactPhone: optionalOneLine(40),
});
export type SiteInput = z.input<typeof siteInputSchema>;
export type SiteValues = z.output<typeof siteInputSchema>;
export const sitePatchSchema = siteInputSchema.partial();

export const sitesQuerySchema = pageQuerySchema.extend({
  branchId: idSchema.optional(),
  customerId: idSchema.optional(),
  status: recordStatusSchema.default('active'),
});
export const siteSortKeys = ['name', 'customerName', 'city', 'unitCount', 'branchName'] as const;

export interface SiteRow {
  id: string;
  branchId: string;
  branchName: string;
  customerId: string;
  customerName: string;
  name: string;
  address: string;
  city: string;
  region: string;
  postalCode: string;
  lat: number;
  lon: number;
  accessNotes: string | null;
  contactName: string | null;
  contactEmail: string | null;
  contactPhone: string | null;
  unitCount: number;
  archivedAt: string | null;
}

// ---------------------------------------------------------------------------------------------
// Units and circuits
// ---------------------------------------------------------------------------------------------

export const circuitInputSchema = z.object({
  number: z.coerce.number().int().min(1).max(8),
  compressorCount: z.coerce.number({ message: 'Enter a number' }).int('Whole compressors only').min(1, 'At least 1').max(8, 'At most 8'),
  chargeLb: z
    .union([z.coerce.number().min(0).max(100_000), z.literal('')])
    .nullish()
    .transform((v) => (v === '' || v === undefined ? null : v)),
});

const unitFieldsSchema = z.object({
  siteId: pickedIdSchema('a site'),
  tag: requiredText('the unit tag (e.g. RTU-3)', 40),
  kind: unitKindSchema,
  make: requiredText('the make', 80),
  model: requiredText('the model', 80),
  serial: requiredText('the serial number', 80),
  installDate: optionalDate,
  warrantyEnd: optionalDate,
  /** One of the refrigerant ids of `@coilpath/calc` (`refrigerantIds`); the server checks it. */
  refrigerant: requiredText('the refrigerant', 20),
  fullChargeLb: z.coerce
    .number({ message: 'Enter the full charge in lb' })
    .min(0, 'Cannot be negative')
    .max(100_000, 'Check the full charge (lb)'),
  applianceCategory: applianceCategorySchema,
  tonnage: z
    .union([z.coerce.number().min(0).max(10_000), z.literal('')])
    .nullish()
    .transform((v) => (v === '' || v === undefined ? null : v)),
  notes: optionalText(limits.longText),
  circuits: z
    .array(circuitInputSchema)
    .min(1, 'A unit has at least one circuit')
    .max(8, 'At most 8 circuits')
    .refine((cs) => new Set(cs.map((c) => c.number)).size === cs.length, 'Circuit numbers must differ'),
});
const warrantyAfterInstall = {
  check: (u: { installDate: string | null; warrantyEnd: string | null }) =>
    !u.installDate || !u.warrantyEnd || u.warrantyEnd >= u.installDate,
  params: { message: 'The warranty cannot end before the install date', path: ['warrantyEnd'] },
};
export const unitInputSchema = unitFieldsSchema.refine(warrantyAfterInstall.check, warrantyAfterInstall.params);
export type UnitInput = z.input<typeof unitInputSchema>;
export type UnitValues = z.output<typeof unitInputSchema>;
/** An edit sends the whole unit; the site is fixed once created. */
export const unitUpdateSchema = unitFieldsSchema.omit({ siteId: true }).refine(warrantyAfterInstall.check, warrantyAfterInstall.params);
export type UnitUpdateValues = z.output<typeof unitUpdateSchema>;

// ---------------------------------------------------------------------------------------------
// A circuit's target ranges (the manufacturer's target superheat and subcooling)
// ---------------------------------------------------------------------------------------------

/** One end of a range: a number, or blank (a form's empty field) for none. Accepts "−" as a minus. */
const targetBound = z.preprocess(
  (v) => (typeof v === 'string' ? (v.trim() === '' ? null : v.trim().replace('\u2212', '-')) : v),
  z.coerce
    .number({ message: 'Enter a number' })
    .refine(Number.isFinite, 'Enter a number')
    .nullish()
    .transform((v) => v ?? null),
);

/**
 * `PUT /api/units/:id/circuits/:number/targets` and the Unit file's form: a circuit's target superheat and
 * subcooling ranges, each optional (both ends, or neither), min ≤ max, in the stated temperature unit (°F, or
 * C for kelvin — the branch's system; the server stores °F differences, as readings). `source` says where
 * the figures come from ("nameplate", "installation manual p. 14"). Blank everything to clear.
 */
export const circuitTargetsInputSchema = z
  .strictObject({
    temperature: temperatureUnitSchema,
    superheatMin: targetBound,
    superheatMax: targetBound,
    subcoolingMin: targetBound,
    subcoolingMax: targetBound,
    source: optionalOneLine(limits.name),
  })
  .superRefine((v, ctx) => {
    const lim = targetRangeLimits[v.temperature];
    const unit = v.temperature === 'F' ? '°F' : 'K';
    for (const kind of circuitTargetKinds) {
      const min = v[`${kind}Min`];
      const max = v[`${kind}Max`];
      for (const [key, value] of [
        [`${kind}Min`, min],
        [`${kind}Max`, max],
      ] as const) {
        if (value !== null && (value < lim.min || value > lim.max)) {
          ctx.addIssue({ code: 'custom', path: [key], message: `Between ${lim.min} and ${lim.max} ${unit}` });
        }
      }
      if ((min === null) !== (max === null)) {
        ctx.addIssue({
          code: 'custom',
          path: [min === null ? `${kind}Min` : `${kind}Max`],
          message: 'Enter both ends of the range, or clear both',
        });
      } else if (min !== null && max !== null && min > max) {
        ctx.addIssue({ code: 'custom', path: [`${kind}Max`], message: `The highest ${kind} cannot be below the lowest (${min} ${unit})` });
      }
    }
  });
export type CircuitTargetsInput = z.input<typeof circuitTargetsInputSchema>;
export type CircuitTargetsValues = z.output<typeof circuitTargetsInputSchema>;

export const targetRangeSchema = z.object({ min: z.number(), max: z.number() });
/** A circuit's target ranges as the API answers them: in the unit branch's system (°F or K), null where none is set. */
export const circuitTargetsSchema = z.object({
  superheat: targetRangeSchema.nullable(),
  subcooling: targetRangeSchema.nullable(),
  source: z.string().nullable(),
}) satisfies z.ZodType<CircuitTargets>;

export const unitsQuerySchema = pageQuerySchema.extend({
  branchId: idSchema.optional(),
  siteId: idSchema.optional(),
  status: recordStatusSchema.default('active'),
});
export const unitSortKeys = [
  'tag',
  'kind',
  'make',
  'model',
  'serial',
  'refrigerant',
  'fullChargeLb',
  'installDate',
  'warrantyEnd',
] as const;

export interface CircuitRow {
  id: string;
  number: number;
  compressorCount: number;
  chargeLb: number | null;
}

export interface UnitRow {
  id: string;
  branchId: string;
  siteId: string;
  siteName: string;
  tag: string;
  kind: z.infer<typeof unitKindSchema>;
  make: string;
  model: string;
  serial: string;
  installDate: string | null;
  warrantyEnd: string | null;
  refrigerant: string;
  fullChargeLb: number;
  applianceCategory: z.infer<typeof applianceCategorySchema>;
  tonnage: number | null;
  notes: string | null;
  archivedAt: string | null;
  circuits: CircuitRow[];
}

// ---------------------------------------------------------------------------------------------
// Archiving and deleting
// ---------------------------------------------------------------------------------------------

/** What keeps a record from being deleted (the 409 `has_history` answer's details). */
export interface HistoryCounts {
  workOrders: number;
  visits: number;
  readings: number;
  alarms: number;
  refrigerantEvents: number;
  agreements: number;
  leakCases: number;
  findings: number;
  attachments: number;
  /** Controllers registered for the site (alarm sources): their deliveries are history too. */
  alarmSources: number;
}

// ---------------------------------------------------------------------------------------------
// Equipment import (CSV)
// ---------------------------------------------------------------------------------------------

/**
 * The columns of the equipment import, in template order. Headers are matched case-insensitively,
 * with spaces or dashes read as underscores.
 */
export const unitImportColumns = [
  'tag',
  'kind',
  'make',
  'model',
  'serial',
  'install_date',
  'warranty_end',
  'refrigerant',
  'full_charge_lb',
  'appliance_category',
  'tonnage',
  'circuits',
  'compressors_per_circuit',
  'notes',
] as const;
export type UnitImportColumn = (typeof unitImportColumns)[number];
export const unitImportRequiredColumns = [
  'tag',
  'kind',
  'make',
  'model',
  'serial',
  'refrigerant',
  'full_charge_lb',
  'appliance_category',
] as const satisfies readonly UnitImportColumn[];

export const unitImportExample: Record<UnitImportColumn, string> = {
  tag: 'RTU-1',
  kind: 'rooftop_unit',
  make: 'Examplemake',
  model: 'EX-120',
  serial: 'EX24-000123',
  install_date: '2021-05-14',
  warranty_end: '2026-05-14',
  refrigerant: 'R-410A',
  full_charge_lb: '18.5',
  appliance_category: 'comfort_cooling',
  tonnage: '10',
  circuits: '2',
  compressors_per_circuit: '1',
  notes: 'North end of the roof',
};

/** A header as typed → the template's column name ("Full charge (lb)" → full_charge_lb). */
export function normalizeImportHeader(h: string): string {
  return h
    .replace(/^\uFEFF/, '')
    .trim()
    .toLowerCase()
    .replace(/\(lbs?\)/g, 'lb')
    .replace(/[^a-z0-9]+/g, '_')
    .replace(/^_|_$/g, '');
}

/** Largest import accepted in one request. */
export const unitImportLimits = { maxRows: 20_000, maxBytes: 6 * 1024 * 1024 } as const;

export const unitImportSchema = z
  .object({
    siteId: pickedIdSchema('a site'),
    mode: z.enum(['dry-run', 'commit']),
    /** The CSV file's text, header row first. */
    csv: z.string().min(1, 'The file is empty').max(unitImportLimits.maxBytes, 'The file is larger than 6 MB; split it').optional(),
    /** The CSV file's bytes, base64. */
    file: base64FileSchema(unitImportLimits.maxBytes, 'The file is larger than 6 MB; split it').optional(),
  })
  .refine(oneOfCsvOrFile, oneOfCsvOrFileMessage);
export type UnitImportRequest = z.infer<typeof unitImportSchema>;

export interface UnitImportRowError {
  /** 1-based data row (the header row is not counted); the file line is `row + 1`. */
  row: number;
  column: UnitImportColumn | null;
  message: string;
}

export interface UnitImportResult {
  mode: 'dry-run' | 'commit';
  /** What the file was read as: `UTF-8`, or the legacy encoding it was converted from (e.g. `windows-1252`). */
  encoding: string;
  /** Data rows read (header excluded). */
  rowCount: number;
  validCount: number;
  errors: UnitImportRowError[];
  /** Units written (commit only; 0 on a dry run or refusal). */
  created: number;
}
