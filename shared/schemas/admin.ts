import { z } from 'zod';
import { JOB_STATES } from '../jobs';
import { listQuerySchema } from './list-query';

const isoWithZone = z.iso.datetime({ offset: true, message: 'must be an ISO 8601 time with a time zone' });

export const jobListQuerySchema = listQuerySchema(['createdAt', 'runAfter', 'state', 'kind']).extend({
  state: z.enum(JOB_STATES).optional(),
  kind: z.string().trim().max(40).optional(),
});
export type JobListQuery = z.infer<typeof jobListQuerySchema>;

const auditFilters = {
  actorId: z.coerce.number().int().positive().optional(),
  action: z.string().trim().max(64).optional(),
  targetType: z.string().trim().max(32).optional(),
  targetId: z.string().trim().max(64).optional(),
  from: isoWithZone.optional(),
  to: isoWithZone.optional(),
};

export const auditListQuerySchema = listQuerySchema(['at', 'action']).extend(auditFilters);
export type AuditListQuery = z.infer<typeof auditListQuerySchema>;

/**
 * The CSV export takes the same filters and sort, without paging: it streams everything that matches, in the
 * order the screen shows (newest first unless sorted otherwise).
 */
export const auditExportQuerySchema = z.strictObject({ ...auditFilters, sort: auditListQuerySchema.shape.sort });
export type AuditExportQuery = z.infer<typeof auditExportQuerySchema>;

const projectId = z.coerce
  .number({ message: 'projectId must be a number' })
  .int()
  .positive('projectId must be positive');
export const retentionQuerySchema = z.strictObject({ projectId });
export const retentionRunSchema = z.strictObject({
  projectId: z.number().int().positive('projectId must be positive'),
});
export type RetentionQuery = z.infer<typeof retentionQuerySchema>;
