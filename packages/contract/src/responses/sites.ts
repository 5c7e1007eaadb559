/** Answers of `/api/customers`, `/api/sites` and `/api/units` (the office's records), tied to `../sites`. */
import { z } from 'zod';
import type { Page } from '../common';
import { type CircuitRow, type CustomerRow, type SiteRow, type UnitImportResult, type UnitRow, unitImportColumns } from '../sites';
import { applianceCategorySchema, unitKindSchema } from '../vocabulary-schemas';
import type { Agree, AllAgree } from './agree';

/** A page of rows (`Page<T>`): the list routes' answer. */
export const pageSchema = <T extends z.ZodType>(row: T) =>
  z.object({ rows: z.array(row), total: z.number(), page: z.number(), pageSize: z.number() });

export const customerRowSchema = z.object({
  id: z.string(),
  branchId: z.string(),
  branchName: z.string(),
  name: z.string(),
  contactName: z.string().nullable(),
  contactEmail: z.string().nullable(),
  contactPhone: z.string().nullable(),
  billingAddress: z.string().nullable(),
  notes: z.string().nullable(),
  siteCount: z.number(),
  archivedAt: z.string().nullable(),
});
export const customerPageSchema = pageSchema(customerRowSchema);

export const siteRowSchema = z.object({
  id: z.string(),
  branchId: z.string(),
  branchName: z.string(),
  customerId: z.string(),
  customerName: z.string(),
  name: z.string(),
  address: z.string(),
  city: z.string(),
  region: z.string(),
  postalCode: z.string(),
  lat: z.number(),
  lon: z.number(),
  accessNotes: z.string().nullable(),
  contactName: z.string().nullable(),
  contactEmail: z.string().nullable(),
  contactPhone: z.string().nullable(),
  unitCount: z.number(),
  archivedAt: z.string().nullable(),
});
export const sitePageSchema = pageSchema(siteRowSchema);

export const circuitRowSchema = z.object({
  id: z.string(),
  number: z.number(),
  compressorCount: z.number(),
  chargeLb: z.number().nullable(),
});

export const unitRowSchema = z.object({
  id: z.string(),
  branchId: z.string(),
  siteId: z.string(),
  siteName: z.string(),
  tag: z.string(),
  kind: unitKindSchema,
  make: z.string(),
  model: z.string(),
  serial: z.string(),
  installDate: z.string().nullable(),
  warrantyEnd: z.string().nullable(),
  refrigerant: z.string(),
  fullChargeLb: z.number(),
  applianceCategory: applianceCategorySchema,
  tonnage: z.number().nullable(),
  notes: z.string().nullable(),
  archivedAt: z.string().nullable(),
  circuits: z.array(circuitRowSchema),
});
export const unitPageSchema = pageSchema(unitRowSchema);

export const unitImportResultSchema = z.object({
  mode: z.enum(['dry-run', 'commit']),
  encoding: z.string(),
  rowCount: z.number(),
  validCount: z.number(),
  errors: z.array(z.object({ row: z.number(), column: z.enum(unitImportColumns).nullable(), message: z.string() })),
  created: z.number(),
});

export type SitesChecks = AllAgree<
  [
    Agree<CustomerRow, typeof customerRowSchema>,
    Agree<Page<CustomerRow>, typeof customerPageSchema>,
    Agree<SiteRow, typeof siteRowSchema>,
    Agree<Page<SiteRow>, typeof sitePageSchema>,
    Agree<CircuitRow, typeof circuitRowSchema>,
    Agree<UnitRow, typeof unitRowSchema>,
    Agree<Page<UnitRow>, typeof unitPageSchema>,
    Agree<UnitImportResult, typeof unitImportResultSchema>,
  ]
>;
