import { queryOptions } from '@tanstack/react-query';
import type {
  CreateInspections,
  CreateInspectionsResult,
  FactoryDefectReview,
  FixQualityReport,
  FixQualityTable,
  ModelAlerts,
  WarrantyClaim,
  WarrantyClaimUpdate,
} from '@coilpath/contract';
import { api, withQuery } from '@/lib/api-client';

export interface PeriodQuery {
  from: string;
  to: string;
  branchId: string | undefined;
}

export const fixQualityKeys = {
  all: ['fix-quality'] as const,
  report: (q: PeriodQuery) => ['fix-quality', 'report', q] as const,
  defects: (q: PeriodQuery) => ['fix-quality', 'factory-defects', q] as const,
  alerts: () => ['fix-quality', 'model-alerts'] as const,
};

export const reportQuery = (q: PeriodQuery) =>
  queryOptions({
    queryKey: fixQualityKeys.report(q),
    queryFn: () => api.get<FixQualityReport>('/api/reports/fix-quality', { ...q }, { check: 'fixQualityReportSchema' }),
  });

export const defectsQuery = (q: PeriodQuery) =>
  queryOptions({
    queryKey: fixQualityKeys.defects(q),
    queryFn: () =>
      api.get<FactoryDefectReview>('/api/reports/fix-quality/factory-defects', { ...q }, { check: 'factoryDefectReviewSchema' }),
  });

export const alertsQuery = () =>
  queryOptions({
    queryKey: fixQualityKeys.alerts(),
    queryFn: () =>
      api.get<ModelAlerts>('/api/reports/fix-quality/model-alerts', undefined, { check: 'modelAlertsSchema' }).then((r) => r.alerts),
  });

export const updateClaim = (workOrderId: string, body: WarrantyClaimUpdate) =>
  api
    .patch<{ claim: WarrantyClaim }>(`/api/warranty-claims/${workOrderId}`, body, { check: 'warrantyClaimAnswerSchema' })
    .then((r) => r.claim);

export const createInspections = (body: CreateInspections) =>
  api.post<CreateInspectionsResult>('/api/reports/fix-quality/model-alerts/inspections', body, { check: 'createInspectionsResultSchema' });

/** Server-side exports: plain links, so the browser downloads them with the session cookie. */
export const csvUrl = (q: PeriodQuery, table: FixQualityTable) => withQuery('/api/reports/fix-quality.csv', { ...q, table });
export const pdfUrl = (q: PeriodQuery) => withQuery('/api/reports/fix-quality.pdf', { ...q });
