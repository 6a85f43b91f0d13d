import { Router, type Response } from 'express';
import type { Database } from '@api/db/client';
import { parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { loadCapabilityReport, reportPreview } from '@api/reports/capability';
import { writeCapabilityCsv } from '@api/reports/csv';
import { writeCapabilityPdf } from '@api/reports/pdf';
import { resolveReportScope, type ReportScope } from '@api/reports/scope';
import type { CapabilityReportPreview } from '@shared/schemas/reports';
import { capabilityReportQuerySchema } from './schema';

/** "capability-HVL25-FLOW-2026-06-01-to-2026-11-30": the product's or characteristic's code and the period, safe in any file system. */
function fileName(scope: ReportScope, single: boolean, ext: string): string {
  const code = (single ? scope.characteristics[0].code : scope.product.code).replace(/[^A-Za-z0-9._-]+/g, '_');
  return `capability-${code}-${scope.period.from}-to-${scope.period.to}.${ext}`;
}

function attachment(res: Response, type: string, name: string): void {
  res.set({ 'Content-Type': type, 'Content-Disposition': `attachment; filename="${name}"`, 'Cache-Control': 'private, no-store' });
}

/**
 * Capability reports for auditors and managers: a preview of the figures, the PDF and the CSV, all from
 * the chart computation of the same window. Reading a report changes nothing, so nothing is audited.
 */
export function reportsRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession);
  router.use(requirePermission('report.read'));

  router.get('/capability', async (req, res) => {
    const query = parseBody(capabilityReportQuerySchema, req.query);
    const report = await loadCapabilityReport(db, await resolveReportScope(db, query));
    res.json(reportPreview(report) satisfies CapabilityReportPreview);
  });

  router.get('/capability.pdf', async (req, res) => {
    const query = parseBody(capabilityReportQuerySchema, req.query);
    // The scope first: an unknown id answers 404 before any PDF header is sent.
    const scope = await resolveReportScope(db, query);
    attachment(res, 'application/pdf', fileName(scope, query.characteristic !== undefined, 'pdf'));
    await writeCapabilityPdf(db, query, req.user!.name, res);
    res.end();
  });

  router.get('/capability.csv', async (req, res) => {
    const query = parseBody(capabilityReportQuerySchema, req.query);
    const scope = await resolveReportScope(db, query);
    attachment(res, 'text/csv; charset=utf-8', fileName(scope, query.characteristic !== undefined, 'csv'));
    await writeCapabilityCsv(db, query, res);
    res.end();
  });

  return router;
}
