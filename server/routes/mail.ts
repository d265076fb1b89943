import { Router, type Request, type Response } from 'express';
import type { ListPage, MailLogEntry } from '../../shared/api-types';
import { mailListQuerySchema, type MailListQuery } from '../../shared/schemas/mail';
import { requireRole } from '../middlewares/auth';
import { validated } from '../middlewares/validate';
import { listMail } from '../core/mail/mail-log';

export const mailRouter = Router();

mailRouter.get('/', requireRole('admin'), validated({ query: mailListQuerySchema }, getMailLog));

async function getMailLog(
  { query }: { query: MailListQuery },
  _req: Request,
  res: Response<ListPage<MailLogEntry>>,
): Promise<void> {
  res.json(await listMail(query));
}
