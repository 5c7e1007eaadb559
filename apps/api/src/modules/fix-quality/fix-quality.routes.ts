import { Router } from 'express';
import { z } from 'zod';
import {
  createInspectionsSchema,
  fixQualityCsvQuerySchema,
  fixQualityQuerySchema,
  idSchema,
  warrantyClaimUpdateSchema,
} from '@coilpath/contract';
import {
  createInspectionsResultSchema,
  factoryDefectReviewSchema,
  fixQualityReportSchema,
  modelAlertsSchema,
  warrantyClaimAnswerSchema,
} from '@coilpath/contract/responses';
import type { AppContext } from '../../context';
import { requireRole } from '../../auth/middleware';
import { resolveBranch } from '../../auth/policy';
import { endpoint } from '../../lib/endpoint';
import { fixQualityReport, reportScopeName } from './fix-quality.service';
import { factoryDefectReview, updateWarrantyClaim } from './factory-defects.service';
import { createInspections, modelAlerts } from './model-alerts.service';
import { csvFileName, reportPdf, tableCsv } from './fix-quality.export';

/**
 * `/api/reports`: the Fix Quality report, its factory-defect review, model alerts, CSV and PDF exports.
 * Owner: every branch (or one); branch manager: the own branch only; other roles: 403.
 */
export function fixQualityRoutes(ctx: AppContext): Router {
  const r = Router();
  const readers = requireRole('owner', 'branch_manager');

  r.get(
    '/fix-quality',
    readers,
    endpoint({ query: fixQualityQuerySchema, response: fixQualityReportSchema }, ({ query, user }) =>
      fixQualityReport(ctx.db, { from: query.from, to: query.to }, resolveBranch(user, query.branchId), ctx.clock.now()),
    ),
  );

  r.get(
    '/fix-quality/factory-defects',
    readers,
    endpoint({ query: fixQualityQuerySchema, response: factoryDefectReviewSchema }, ({ query, user }) =>
      factoryDefectReview(ctx.db, { from: query.from, to: query.to }, resolveBranch(user, query.branchId)),
    ),
  );

  r.get(
    '/fix-quality/model-alerts',
    readers,
    endpoint({ response: modelAlertsSchema }, async ({ user }) => ({ alerts: await modelAlerts(ctx.db, user) })),
  );

  r.post(
    '/fix-quality/model-alerts/inspections',
    requireRole('owner'),
    endpoint({ body: createInspectionsSchema, status: 201, response: createInspectionsResultSchema }, ({ body, user }) =>
      createInspections(ctx.db, ctx.clock, user, body),
    ),
  );

  r.get(
    '/fix-quality.csv',
    readers,
    endpoint({ query: fixQualityCsvQuerySchema, response: 'file' }, async ({ query, user, res }) => {
      const branchId = resolveBranch(user, query.branchId);
      const period = { from: query.from, to: query.to };
      const csv =
        query.table === 'factoryDefects'
          ? tableCsv(query.table, { defects: await factoryDefectReview(ctx.db, period, branchId) })
          : query.table === 'modelAlerts'
            ? tableCsv(query.table, { alerts: await modelAlerts(ctx.db, user) })
            : tableCsv(query.table, { report: await fixQualityReport(ctx.db, period, branchId, ctx.clock.now()) });
      res.setHeader('Content-Type', 'text/csv; charset=utf-8');
      res.setHeader('Content-Disposition', `attachment; filename="${csvFileName(query.table, query.from, query.to)}"`);
      res.send(csv);
    }),
  );

  r.get(
    '/fix-quality.pdf',
    readers,
    endpoint({ query: fixQualityQuerySchema, response: 'file' }, async ({ query, user, res }) => {
      const branchId = resolveBranch(user, query.branchId);
      const period = { from: query.from, to: query.to };
      const now = ctx.clock.now();
      const [report, defects, alerts, branchName] = await Promise.all([
        fixQualityReport(ctx.db, period, branchId, now),
        factoryDefectReview(ctx.db, period, branchId),
        modelAlerts(ctx.db, user),
        reportScopeName(ctx.db, branchId),
      ]);
      const pdf = await reportPdf({ report, defects, alerts, branchName, generatedAt: now });
      res.setHeader('Content-Type', 'application/pdf');
      res.setHeader('Content-Disposition', `attachment; filename="coilpath-fix-quality-${query.from}-to-${query.to}.pdf"`);
      res.send(pdf);
    }),
  );

  return r;
}

/** `/api/warranty-claims/:workOrderId`: the owner, or the manager of the work order's branch. */
export function warrantyClaimRoutes(ctx: AppContext): Router {
  const r = Router();
  r.patch(
    '/:workOrderId',
    requireRole('owner', 'branch_manager'),
    endpoint(
      { params: z.object({ workOrderId: idSchema }), body: warrantyClaimUpdateSchema, response: warrantyClaimAnswerSchema },
      async ({ params, body, user }) => ({
        claim: await updateWarrantyClaim(ctx.db, ctx.clock, user, params.workOrderId, body),
      }),
    ),
  );
  return r;
}
