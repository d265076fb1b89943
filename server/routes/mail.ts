import { Router, type Request, type Response } from 'express';
import type { ListPage, MailLogEntry } from '../../shared/api-types';
import { mailListQuerySchema, type MailListQuery } from '../../shared/schemas/mail';
import { requireRole } from '../middlewares/auth';
import { validate } from '../middlewares/validate';
import { listMail } from '../core/mail/mail-log';

export const mailRouter = Router();

mailRouter.get('/', requireRole('admin'), validate({ query: mailListQuerySchema }), getMailLog);

async function getMailLog(req: Request, res: Response<ListPage<MailLogEntry>>): Promise<void> {
  res.json(await listMail(req.valid.query as MailListQuery));
}
