import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { Router, type Request, type Response } from 'express';
import type { ListPage } from '../../shared/api-types';
import {
  auditExportQuerySchema,
  auditListQuerySchema,
  type AuditExportQuery,
  type AuditListQuery,
} from '../../shared/schemas/admin';
import type { AuditEntry } from '../../shared/types/admin';
import { requireRole } from '../middlewares/auth';
import { validated } from '../middlewares/validate';
import { auditCsvLines, listAudit } from '../core/audit/audit-log';

/** Mounted at /api so the export keeps its `.csv` address: /api/audit and /api/audit.csv. */
export const auditRouter = Router();

auditRouter.get('/audit', requireRole('admin'), validated({ query: auditListQuerySchema }, getAudit));
auditRouter.get('/audit.csv', requireRole('admin'), validated({ query: auditExportQuerySchema }, getAuditCsv));

async function getAudit(
  { query }: { query: AuditListQuery },
  _req: Request,
  res: Response<ListPage<AuditEntry>>,
): Promise<void> {
  res.json(await listAudit(query));
}

async function getAuditCsv({ query }: { query: AuditExportQuery }, _req: Request, res: Response): Promise<void> {
  res.setHeader('Content-Type', 'text/csv; charset=utf-8');
  res.attachment(`kinefold-audit-${new Date().toISOString().slice(0, 10)}.csv`);
  await pipeline(Readable.from(auditCsvLines(query)), res);
}
