import { z } from 'zod';
import { listQuerySchema } from './list-query';

export const MAIL_SORT_FIELDS = ['at', 'to', 'subject'] as const;

/** The mail log: newest first unless asked otherwise; `search` matches the recipient or the subject. */
export const mailListQuerySchema = listQuerySchema(MAIL_SORT_FIELDS).extend({
  search: z.string().trim().max(200).optional(),
});
export type MailListQuery = z.infer<typeof mailListQuerySchema>;
