import { literal, type Order } from 'sequelize';
import { DEFAULT_ESTIMATOR, type EstimatorName } from '../../../shared/estimators';
import type { ListPage } from '../../../shared/api-types';
import type { ProjectBody, ProjectListQuery, ProjectPatch } from '../../../shared/schemas/projects';
import type { ProjectSummary } from '../../../shared/types/projects';
import { DEFAULT_FLAG_THRESHOLDS } from '../../../shared/flag-thresholds';
import { conflict, notFound } from '../errors';
import { Project } from '../models';
import { recordAudit } from '../audit/audit';
import { projectFlagDefaults } from '../settings/settings';
import { checkProjectSettings, storedSettings } from './project-settings';

/** Processing defaults for a new project (the Ingest issue): 5 frames/s, 320 px, Δ 1, 2 and 4 sampled frames. */
export const PROJECT_DEFAULTS = {
  sampleFps: 5,
  workingSize: 320,
  deltas: [1, 2, 4],
  estimator: DEFAULT_ESTIMATOR,
  estimatorParams: {},
} as const;

const USAGE_ATTRIBUTES: [ReturnType<typeof literal>, string][] = [
  [literal('(SELECT COALESCE(SUM("storedBytes"), 0) FROM clips WHERE clips."projectId" = "Project".id)'), 'usedBytes'],
  [
    literal(
      '(SELECT COALESCE(SUM("sizeBytes"), 0) FROM clips WHERE clips."projectId" = "Project".id AND clips."purgedAt" IS NULL)',
    ),
    'sourceBytes',
  ],
  [literal('(SELECT COUNT(*) FROM clips WHERE clips."projectId" = "Project".id)'), 'clipCount'],
];

function toSummary(project: Project): ProjectSummary {
  return {
    id: project.id,
    name: project.name,
    description: project.description,
    archived: project.archived,
    quotaBytes: project.quotaBytes === null ? null : Number(project.quotaBytes),
    retentionDays: project.retentionDays ?? null,
    usedBytes: Number(project.getDataValue('usedBytes' as never) ?? 0),
    sourceBytes: Number(project.getDataValue('sourceBytes' as never) ?? 0),
    clipCount: Number(project.getDataValue('clipCount' as never) ?? 0),
    settings: {
      sampleFps: project.sampleFps,
      workingSize: project.workingSize,
      deltas: project.deltas,
      estimator: project.estimator as EstimatorName,
      estimatorParams: project.estimatorParams,
      flagThresholds: { ...DEFAULT_FLAG_THRESHOLDS, ...project.flagThresholds },
    },
    createdAt: project.createdAt.toISOString(),
    updatedAt: project.updatedAt.toISOString(),
  };
}

export async function listProjects(query: ProjectListQuery): Promise<ListPage<ProjectSummary>> {
  const order: Order = query.sort
    ? [
        [query.sort.replace(/^-/, ''), query.sort.startsWith('-') ? 'DESC' : 'ASC'],
        ['id', 'ASC'],
      ]
    : [
        ['archived', 'ASC'],
        ['name', 'ASC'],
      ];
  const where = query.archived === undefined ? {} : { archived: query.archived === 'true' };
  const { rows, count } = await Project.findAndCountAll({
    where,
    order,
    attributes: { include: USAGE_ATTRIBUTES },
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  });
  return { items: rows.map(toSummary), total: count, page: query.page, pageSize: query.pageSize };
}

export async function getProject(id: number): Promise<ProjectSummary> {
  const project = await Project.findByPk(id, { attributes: { include: USAGE_ATTRIBUTES } });
  if (!project) throw notFound(`Project ${id}`);
  return toSummary(project);
}

async function assertNameFree(name: string, exceptId?: number): Promise<void> {
  const holder = await Project.findOne({ where: { name } });
  if (holder && holder.id !== exceptId)
    throw conflict('project_name_taken', `A project named "${name}" already exists.`);
}

export async function createProject(body: ProjectBody, actorId: number): Promise<ProjectSummary> {
  await assertNameFree(body.name);
  const settings = checkProjectSettings({
    sampleFps: body.sampleFps ?? PROJECT_DEFAULTS.sampleFps,
    workingSize: body.workingSize ?? PROJECT_DEFAULTS.workingSize,
    deltas: body.deltas ?? [...PROJECT_DEFAULTS.deltas],
    estimator: body.estimator ?? PROJECT_DEFAULTS.estimator,
    estimatorParams: body.estimatorParams ?? {},
    flagThresholds: body.flagThresholds ?? (await projectFlagDefaults()),
  });
  const project = await Project.sequelize!.transaction(async (transaction) => {
    const created = await Project.create(
      {
        name: body.name,
        description: body.description ?? '',
        archived: body.archived ?? false,
        quotaBytes: body.quotaBytes ?? null,
        retentionDays: body.retentionDays ?? null,
        ...settings,
      },
      { transaction },
    );
    await recordAudit(
      {
        actorId,
        action: 'project.create',
        targetType: 'project',
        targetId: created.id,
        detail: { name: created.name },
      },
      transaction,
    );
    return created;
  });
  return getProject(project.id);
}

export async function updateProject(id: number, patch: ProjectPatch, actorId: number): Promise<ProjectSummary> {
  const project = await Project.findByPk(id);
  if (!project) throw notFound(`Project ${id}`);
  if (patch.name !== undefined) await assertNameFree(patch.name, id);
  const { sampleFps, workingSize, deltas, estimator, estimatorParams, flagThresholds } = patch;
  checkProjectSettings({
    ...storedSettings(project),
    ...Object.fromEntries(
      Object.entries({ sampleFps, workingSize, deltas, estimator, estimatorParams, flagThresholds }).filter(
        ([, value]) => value !== undefined,
      ),
    ),
  });
  await Project.sequelize!.transaction(async (transaction) => {
    await project.update(patch, { transaction });
    await recordAudit(
      {
        actorId,
        action: patch.archived === true ? 'project.archive' : 'project.update',
        targetType: 'project',
        targetId: id,
        detail: { changed: Object.keys(patch) },
      },
      transaction,
    );
  });
  return getProject(id);
}
