import { QueryTypes, type QueryOptionsWithType } from 'sequelize';
import type { ClipFlagDetail, ClipProbe, ClipSummary } from '../../../shared/types/clips';
import type { ClipVerdict } from '../../../shared/types/review';
import { storedBoolean, storedIso, storedIsoOrNull, storedJson } from '../db/stored-values';
import { Clip } from '../models';

/**
 * One page of the clip list read lean: one statement picks the page's clips (by the list's filter and order, on
 * clips alone so indexes apply) and joins only those to their project, uploader and verdict in force (with its
 * curator); plain rows become the API's objects, field for field as `Clip.toApi` makes them. Building Sequelize
 * instances for the 50 clips, their relations and four more statements cost more of the server's CPU than the SQL
 * under 50 concurrent clients (docs/benchmarks.md, "Load").
 */
const pageSql = (chosen: string, order: string) => `
  SELECT c.id, c."projectId", p.name AS "projectName", c."uploaderId", u.name AS "uploaderName", c."originalName",
    c."sizeBytes", c."storedBytes", c.sha256, c.state, c.stage, c.error, c.flags, c.container, c.codec,
    c."durationS", c.fps, c.width, c.height, c.rotation, c."hasThumbnail", c.site, c.rig, c."capturedAt", c.tags,
    c.notes, c."purgedAt", c."createdAt", c."updatedAt", c."hasPreview", c."frameCount", c."cutCount",
    c."medianSharpness", c."meanLuma", c."flagDetails", c."meanMotion", c."consistentShare", c."usablePairs",
    v.id AS "verdictId", v.decision AS "verdictDecision", v.reason AS "verdictReason",
    v."reasonLabel" AS "verdictReasonLabel", v.comment AS "verdictComment", v."curatorId" AS "verdictCuratorId",
    k.name AS "verdictCuratorName", v.at AS "verdictAt", v.bulk AS "verdictBulk"
  FROM (${chosen}) chosen
  JOIN clips c ON c.id = chosen.id
  LEFT JOIN projects p ON p.id = c."projectId"
  LEFT JOIN users u ON u.id = c."uploaderId"
  LEFT JOIN verdicts v ON v."clipId" = c.id AND v."supersededAt" IS NULL
  LEFT JOIN users k ON k.id = v."curatorId"
  ORDER BY ${order}`;

type StoredDate = string | Date;

/** A page row as the driver gives it: the probe's fields as stored, the rest in the forms SQLite or PostgreSQL use. */
interface PageRow extends ClipProbe {
  id: number;
  projectId: number;
  projectName: string | null;
  uploaderId: number;
  uploaderName: string | null;
  originalName: string;
  sizeBytes: number | string;
  storedBytes: number | string;
  sha256: string;
  state: ClipSummary['state'];
  stage: string | null;
  error: string | null;
  flags: string | string[];
  hasThumbnail: number | boolean;
  site: string;
  rig: string;
  capturedAt: StoredDate | null;
  tags: string | string[];
  notes: string;
  purgedAt: StoredDate | null;
  createdAt: StoredDate;
  updatedAt: StoredDate;
  hasPreview: number | boolean;
  frameCount: number | null;
  cutCount: number | null;
  medianSharpness: number | null;
  meanLuma: number | null;
  flagDetails: string | ClipFlagDetail[];
  meanMotion: number | null;
  consistentShare: number | null;
  usablePairs: number | null;
  verdictId: number | null;
  verdictDecision: ClipVerdict['decision'];
  verdictReason: string | null;
  verdictReasonLabel: string | null;
  verdictComment: string;
  verdictCuratorId: number;
  verdictCuratorName: string | null;
  verdictAt: StoredDate;
  verdictBulk: number | boolean;
}

function verdictOf(row: PageRow): ClipVerdict | null {
  if (row.verdictId === null) return null;
  return {
    id: row.verdictId,
    decision: row.verdictDecision,
    reason: row.verdictReason,
    reasonLabel: row.verdictReasonLabel,
    comment: row.verdictComment,
    curatorId: row.verdictCuratorId,
    curatorName: row.verdictCuratorName ?? '',
    at: storedIso(row.verdictAt),
    // The verdict in force, by the join's condition.
    supersededAt: null,
    bulk: storedBoolean(row.verdictBulk),
  };
}

function toSummary(row: PageRow): ClipSummary {
  return {
    id: row.id,
    projectId: row.projectId,
    projectName: row.projectName ?? '',
    uploaderId: row.uploaderId,
    uploaderName: row.uploaderName ?? '',
    originalName: row.originalName,
    sizeBytes: Number(row.sizeBytes),
    storedBytes: Number(row.storedBytes),
    sha256: row.sha256,
    state: row.state,
    stage: row.stage,
    error: row.error,
    flags: storedJson(row.flags),
    probe: {
      container: row.container,
      codec: row.codec,
      durationS: row.durationS,
      fps: row.fps,
      width: row.width,
      height: row.height,
      rotation: row.rotation,
    },
    hasThumbnail: storedBoolean(row.hasThumbnail),
    site: row.site,
    rig: row.rig,
    capturedAt: storedIsoOrNull(row.capturedAt),
    tags: storedJson(row.tags),
    notes: row.notes,
    purgedAt: storedIsoOrNull(row.purgedAt),
    createdAt: storedIso(row.createdAt),
    updatedAt: storedIso(row.updatedAt),
    hasPreview: storedBoolean(row.hasPreview),
    frameCount: row.frameCount,
    cutCount: row.cutCount,
    medianSharpness: row.medianSharpness,
    meanLuma: row.meanLuma,
    flagDetails: storedJson(row.flagDetails),
    meanMotion: row.meanMotion,
    consistentShare: row.consistentShare,
    usablePairs: row.usablePairs,
    verdict: verdictOf(row),
  };
}

/**
 * The clips a statement `chosen` picks (its one column: `id`), as the list shows them, in `order` (terms on `c`, the
 * same order `chosen` picks by). `tableNames: []` tells Sequelize's SQLite dialect that the statement needs no
 * column types: from a Sequelize-written `chosen` it would otherwise read `PRAGMA table_info` before every page.
 */
export async function readClipPage(chosen: string, order: string): Promise<ClipSummary[]> {
  const rows = await Clip.sequelize!.query<PageRow>(pageSql(chosen, order), {
    type: QueryTypes.SELECT,
    tableNames: [],
  } as QueryOptionsWithType<QueryTypes.SELECT>);
  return rows.map(toSummary);
}
