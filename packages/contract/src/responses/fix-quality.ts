/** Answers of `/api/reports/fix-quality…` and `/api/warranty-claims` (the Fix Quality report): the contract's own schemas. */
import { z } from 'zod';
import {
  createInspectionsResultSchema,
  factoryDefectReviewSchema,
  fixQualityReportSchema,
  modelAlertsSchema,
  warrantyClaimSchema,
} from '../fix-quality';

export { createInspectionsResultSchema, factoryDefectReviewSchema, fixQualityReportSchema, modelAlertsSchema };
export const warrantyClaimAnswerSchema = z.object({ claim: warrantyClaimSchema });
