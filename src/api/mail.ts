import type { ListPage, MailLogEntry } from '../../shared/api-types';
import type { MailListQuery } from '../../shared/schemas/mail';
import { http } from './http';

export const listMail = (query: Partial<MailListQuery>) => http.get<ListPage<MailLogEntry>>('/mail', query);
