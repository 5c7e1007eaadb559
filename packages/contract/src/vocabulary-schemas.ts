import { z } from 'zod';
import {
  additionExemptionKinds,
  alarmDeliveryStatuses,
  alarmSources,
  applianceCategories,
  attachmentKinds,
  causeCodes,
  causeOrigins,
  epa608Types,
  leakCaseStatuses,
  leakObligationStates,
  noteAudiences,
  priorities,
  refrigerantEventReasons,
  refrigerantRecordEventKinds,
  returnNeeds,
  roles,
  unitKinds,
  visitOutcomes,
  warrantyClaimStatuses,
  workOrderKinds,
  workOrderStates,
} from './vocabulary';

/* The zod enums of the vocabulary's lists (`vocabulary.ts`), for the API's routes and the forms. */

export const roleSchema = z.enum(roles);
export const epa608TypeSchema = z.enum(epa608Types);
export const workOrderKindSchema = z.enum(workOrderKinds);
export const workOrderStateSchema = z.enum(workOrderStates);
export const prioritySchema = z.enum(priorities);
export const visitOutcomeSchema = z.enum(visitOutcomes);
export const returnNeedSchema = z.enum(returnNeeds);
export const causeCodeSchema = z.enum(causeCodes);
export const causeOriginSchema = z.enum(causeOrigins);
export const noteAudienceSchema = z.enum(noteAudiences);
export const unitKindSchema = z.enum(unitKinds);
export const applianceCategorySchema = z.enum(applianceCategories);
export const refrigerantEventReasonSchema = z.enum(refrigerantEventReasons);
export const leakCaseStatusSchema = z.enum(leakCaseStatuses);
export const leakObligationStateSchema = z.enum(leakObligationStates);
export const refrigerantRecordEventKindSchema = z.enum(refrigerantRecordEventKinds);
export const additionExemptionSchema = z.enum(additionExemptionKinds);
export const alarmSourceSchema = z.enum(alarmSources);
export const alarmDeliveryStatusSchema = z.enum(alarmDeliveryStatuses);
export const attachmentKindSchema = z.enum(attachmentKinds);
export const warrantyClaimStatusSchema = z.enum(warrantyClaimStatuses);

const hhmm = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Use 24-hour HH:MM');
export const dayHoursSchema = z
  .object({ start: hhmm, end: hhmm })
  .refine((h) => h.start < h.end, { message: 'The day must end after it starts', path: ['end'] })
  .nullable();
export const workingHoursSchema = z.object({
  sun: dayHoursSchema,
  mon: dayHoursSchema,
  tue: dayHoursSchema,
  wed: dayHoursSchema,
  thu: dayHoursSchema,
  fri: dayHoursSchema,
  sat: dayHoursSchema,
});
export type WorkingHours = z.infer<typeof workingHoursSchema>;
