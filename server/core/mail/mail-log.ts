import type { Order } from 'sequelize';
import type { ListPage, MailLogEntry } from '../../../shared/api-types';
import type { MailListQuery } from '../../../shared/schemas/mail';
import { MailMessage } from '../models';
import { containsText } from '../db/text-search';

/** What the fake SMTP server received, newest first unless another order is asked for. */
export async function listMail(query: MailListQuery): Promise<ListPage<MailLogEntry>> {
  const where = query.search ? containsText<MailMessage>(MailMessage.sequelize!, ['to', 'subject'], query.search) : {};
  const sort = query.sort ?? '-at';
  const order: Order = [
    [sort.replace(/^-/, ''), sort.startsWith('-') ? 'DESC' : 'ASC'],
    ['id', 'DESC'],
  ];
  const { rows, count } = await MailMessage.findAndCountAll({
    where,
    order,
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  });
  return { items: rows.map((message) => message.toApi()), total: count, page: query.page, pageSize: query.pageSize };
}
