/** What the branch routes answer: records turned into the contract's shapes. */
import type { BranchDetail } from '@coilpath/contract';
import type { BranchListRecord, BranchRecord } from './branches.repo';

export const presentBranchDetail = (b: BranchRecord): BranchDetail => ({
  id: b.id,
  name: b.name,
  code: b.code,
  timeZone: b.timeZone,
  baseAddress: b.baseAddress,
  baseLat: b.baseLat,
  baseLon: b.baseLon,
  holidays: b.holidays,
  labourRate: b.labourRateCents / 100,
  currency: b.currency,
  unitSystem: b.unitSystem,
  elevationMeters: b.elevationMeters,
  sensorTolerancePercent: b.sensorTolerancePercent,
  sensorToleranceAbsolute: b.sensorToleranceAbsolute,
  repeatAlarmCount: b.repeatAlarmCount,
  repeatAlarmDays: b.repeatAlarmDays,
  callbackWindowDays: b.callbackWindowDays,
  inspectionDueDays: b.inspectionDueDays,
  tradingName: b.tradingName,
  officeAddress: b.officeAddress,
  officePhone: b.officePhone,
  licenceNumber: b.licenceNumber,
  officeEmail: b.officeEmail,
  archivedAt: b.archivedAt?.toISOString() ?? null,
});

/** A row of the branch switcher: the labour rate in currency units, never archived. */
export const presentBranchListRow = ({ labourRateCents, ...b }: BranchListRecord) => ({
  ...b,
  labourRate: labourRateCents / 100,
  archivedAt: null,
});
