import fs from 'node:fs';
import { QueryTypes } from 'sequelize';
import type { UsageReport } from '../../../shared/types/admin';
import { Project, UsageSnapshot } from '../models';
import type { StoragePaths } from '../storage/paths';

const TREND_DAYS = 30;

/**
 * Where the bytes go: per project and per user from the database (kept current by uploads and the pipeline), by
 * kind and over time from the reconcile-usage job's snapshots (measuring the disk is worker work, never a request's).
 */
export async function usageReport(paths: StoragePaths): Promise<UsageReport> {
  const sequelize = Project.sequelize!;
  const byProject = await sequelize.query<{
    projectId: number;
    name: string;
    usedBytes: number;
    sourceBytes: number;
    quotaBytes: number | null;
  }>(
    `SELECT p.id AS "projectId", p.name AS name, p."quotaBytes" AS "quotaBytes",
            COALESCE((SELECT SUM("storedBytes") FROM clips c WHERE c."projectId" = p.id), 0) AS "usedBytes",
            COALESCE((SELECT SUM("sizeBytes") FROM clips c WHERE c."projectId" = p.id AND c."purgedAt" IS NULL), 0)
              AS "sourceBytes"
     FROM projects p ORDER BY "usedBytes" DESC, p.name`,
    { type: QueryTypes.SELECT },
  );
  const byUser = await sequelize.query<{
    userId: number;
    name: string;
    usedBytes: number;
    sourceBytes: number;
    quotaBytes: number | null;
  }>(
    `SELECT u.id AS "userId", u.name AS name, u."quotaBytes" AS "quotaBytes",
            COALESCE((SELECT SUM("sizeBytes") FROM clips c WHERE c."uploaderId" = u.id AND c."purgedAt" IS NULL), 0)
              AS "sourceBytes",
            COALESCE((SELECT SUM("storedBytes") FROM clips c WHERE c."uploaderId" = u.id), 0)
              + COALESCE((SELECT SUM(bytes) FROM pairsets s WHERE s."ownerId" = u.id), 0) AS "usedBytes"
     FROM users u ORDER BY "usedBytes" DESC, u.name`,
    { type: QueryTypes.SELECT },
  );
  const snapshots = await UsageSnapshot.findAll({ order: [['day', 'DESC']], limit: TREND_DAYS });
  const latest = snapshots[0] ?? null;
  await fs.promises.mkdir(paths.root, { recursive: true });
  const disk = await fs.promises.statfs(paths.root);
  const numeric = <T extends { usedBytes: number; sourceBytes: number; quotaBytes: number | null }>(row: T): T => ({
    ...row,
    usedBytes: Number(row.usedBytes),
    sourceBytes: Number(row.sourceBytes),
    quotaBytes: row.quotaBytes === null ? null : Number(row.quotaBytes),
  });
  const projects = byProject.map(numeric);
  return {
    disk: { usedBytes: (disk.blocks - disk.bfree) * disk.bsize, freeBytes: disk.bavail * disk.bsize },
    totalBytes: projects.reduce((sum, row) => sum + row.usedBytes, 0) + (latest?.byKind.pairsets ?? 0),
    byProject: projects,
    byUser: byUser.map(numeric),
    byKind: latest?.byKind ?? null,
    measuredAt: latest?.takenAt.toISOString() ?? null,
    lastDrift: latest?.drift ?? null,
    trend: snapshots.map((row) => ({ day: row.day, totalBytes: Number(row.totalBytes) })).reverse(),
  };
}
