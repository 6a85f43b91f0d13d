import { Router } from 'express';
import type { Database } from '@api/db/client';
import { verifyAuditChain } from '@api/db/audit-chain';
import { requirePermission, requireSession } from '@api/auth/session';
import { parseBody } from '@api/http/errors';
import { logger } from '@api/logger';
import { writeAuditPack, type PackFile } from '@api/audit-pack/pack';
import { writeAuditCsv } from '@api/audit/csv';
import { ncrListCsv } from '@api/ncrs/list-csv';
import { writeCharacteristicCsv } from '@api/reports/csv';
import { writeCapabilityPdf } from '@api/reports/pdf';
import { resolveReportScope } from '@api/reports/scope';
import { formatPlantDay } from '@shared/time';
import { auditPackQuerySchema } from './schema';

/** A code as a file name inside the ZIP: letters, digits, dot, dash and underscore only. */
const fileSafe = (code: string) => code.replace(/[^A-Za-z0-9._-]+/g, '_');

/**
 * The audit pack (permission audit.read): one ZIP for a product and period with the product's capability report,
 * each characteristic's subgroups, the NCR list, the audit trail of the period and SHA256SUMS. Streamed: the files
 * are written into the archive one after another, so a year of a product never sits in memory.
 */
export function auditPackRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession);

  router.get('/audit-pack.zip', requirePermission('audit.read'), async (req, res) => {
    const q = parseBody(auditPackQuerySchema, req.query);
    // The scope first: an unknown product answers 404 before any byte of the ZIP is sent.
    const scope = await resolveReportScope(db, q);
    const { product, plant, period } = scope;
    const clock = plant.clock;
    const chain = await verifyAuditChain(db);
    const code = fileSafe(product.code);
    const files: PackFile[] = [
      {
        name: `${code}-capability-report.pdf`,
        describe: `Capability report of ${product.code} for the period: a summary page, then one section per characteristic.`,
        write: async (out) => void (await writeCapabilityPdf(db, { product: q.product, from: q.from, to: q.to }, req.user!.name, out)),
      },
      ...scope.characteristics.map(
        (c): PackFile => ({
          name: `characteristics/${fileSafe(c.code)}.csv`,
          describe: `${c.code} ${c.name}: the figures of the report, then one row per subgroup.`,
          write: (out) => writeCharacteristicCsv(db, { characteristicId: c.id, from: q.from, to: q.to }, out),
        }),
      ),
      {
        name: 'ncrs.csv',
        describe: 'Every nonconformance report about the product that was open at any time in the period.',
        write: async (out) => {
          const { csv } = await ncrListCsv(db, { productId: product.id, from: period.fromInstant, to: period.toInstant, timeZone: clock.timeZone });
          out.write(csv);
        },
      },
      {
        name: 'audit-trail.csv',
        describe: 'Every audit event of the period, plant-wide, in chain order, with each event\'s hash and the hash before it.',
        write: async (out) => void (await writeAuditCsv(db, { from: q.from, to: q.to }, out)),
      },
    ];

    res.set({
      'Content-Type': 'application/zip',
      'Content-Disposition': `attachment; filename="audit-pack-${code}-${q.from}-${q.to}.zip"`,
      'Cache-Control': 'private, no-store',
    });
    try {
      await writeAuditPack(
        {
          plantName: plant.name,
          product: { code: product.code, name: product.name },
          period: { from: formatPlantDay(q.from, clock), to: formatPlantDay(q.to, clock) },
          clock,
          generatedBy: req.user!.name,
          generatedAt: new Date(),
          chain,
          files,
        },
        res,
      );
    } catch (error) {
      // Once the first bytes are out the status cannot change: cut the download short, so the ZIP reads as broken.
      if (!res.headersSent) throw error;
      logger.error({ err: error, product: product.id }, 'audit pack failed while streaming');
      res.destroy(error as Error);
    }
  });

  return router;
}
