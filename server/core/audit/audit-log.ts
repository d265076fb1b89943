import { Op, type WhereOptions } from 'sequelize';
import type { ListPage } from '../../../shared/api-types';
import type { AuditExportQuery, AuditListQuery } from '../../../shared/schemas/admin';
import type { AuditEntry } from '../../../shared/types/admin';
import { AuditEvent, User } from '../models';

const EXPORT_BATCH = 1000;

function whereOf(query: AuditExportQuery): WhereOptions<AuditEvent> {
  return {
    ...(query.actorId ? { actorId: query.actorId } : {}),
    ...(query.action ? { action: query.action } : {}),
    ...(query.targetType ? { targetType: query.targetType } : {}),
    ...(query.targetId ? { targetId: query.targetId } : {}),
    ...(query.from || query.to
      ? {
          at: {
            ...(query.from ? { [Op.gte]: new Date(query.from) } : {}),
            ...(query.to ? { [Op.lte]: new Date(query.to) } : {}),
          },
        }
      : {}),
  };
}

function toEntry(event: AuditEvent): AuditEntry {
  return {
    id: event.id,
    at: event.at.toISOString(),
    actorId: event.actorId,
    actorName: (event.get('actor') as User | null)?.name ?? null,
    action: event.action,
    targetType: event.targetType,
    targetId: event.targetId,
    detail: event.detail,
  };
}

const ACTOR = { model: User, as: 'actor', attributes: ['name'] };

/** The screen's order: `sort` as `field` or `-field`, newest first when none is given; id breaks ties. */
function orderOf(sort: string | undefined): [string, 'ASC' | 'DESC'][] {
  const direction = sort?.startsWith('-') || !sort ? 'DESC' : 'ASC';
  const field = sort?.replace(/^-/, '') ?? 'at';
  return [
    [field, direction],
    ['id', direction],
  ];
}

export async function listAudit(query: AuditListQuery): Promise<ListPage<AuditEntry>> {
  const { rows, count } = await AuditEvent.findAndCountAll({
    where: whereOf(query),
    include: [ACTOR],
    order: orderOf(query.sort),
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  });
  return { items: rows.map(toEntry), total: count, page: query.page, pageSize: query.pageSize };
}

/**
 * A CSV field per RFC 4180 (quoted when it holds a comma, quote or line break; quotes doubled). A value that a
 * spreadsheet would run as a formula (=, +, -, @) is prefixed with ' as OWASP's CSV-injection advice says.
 */
export function csvField(value: string): string {
  const guarded = /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
  return /[",\r\n]/.test(guarded) ? `"${guarded.replace(/"/g, '""')}"` : guarded;
}

/**
 * Every matching event as CSV lines in the screen's order (newest first unless sorted otherwise), read in batches
 * so a long trail never sits in memory. Batches are taken below the first row's id, so events recorded while the
 * export runs neither shift the pages nor appear half-way.
 */
export async function* auditCsvLines(query: AuditExportQuery): AsyncGenerator<string> {
  yield 'at,actor,action,target type,target id,detail\r\n';
  const newest = await AuditEvent.max<number, AuditEvent>('id');
  if (!newest) return;
  for (let offset = 0; ; offset += EXPORT_BATCH) {
    const batch = await AuditEvent.findAll({
      where: { ...whereOf(query), id: { [Op.lte]: newest } } as WhereOptions<AuditEvent>,
      include: [ACTOR],
      order: orderOf(query.sort),
      limit: EXPORT_BATCH,
      offset,
    });
    for (const event of batch) {
      const entry = toEntry(event);
      yield `${[
        entry.at,
        entry.actorName ?? 'Kinefold',
        entry.action,
        entry.targetType,
        entry.targetId ?? '',
        JSON.stringify(entry.detail),
      ]
        .map(csvField)
        .join(',')}\r\n`;
    }
    if (batch.length < EXPORT_BATCH) return;
  }
}
