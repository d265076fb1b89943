import { setTimeout as sleep } from 'node:timers/promises';
import { Op } from 'sequelize';
import { PAIRSET_DEFAULTS } from '../../shared/schemas/pairsets';
import type { Config } from '../core/config';
import { ApiToken, Clip, Clustering, Invitation, Job, Pairset, Project, User } from '../core/models';
import { createClustering } from '../core/diversity/clusterings';
import { clusteringCreateSchema } from '../../shared/schemas/diversity';
import { createApiToken } from '../core/people/api-tokens';
import { createInvitation } from '../core/people/invitations';
import { createPairset, startBuild } from '../core/pairsets/pairsets';
import { requestReconcile } from '../core/usage/reconcile-requests';
import { claimClip } from '../core/review/review-claims';
import { decideClip } from '../core/review/review-verdicts';
import { DEMO_BALANCE, DEMO_INVITATION, DEMO_PAIRSET, DEMO_PROJECTS, DEMO_TOKEN_NAME, DEMO_VERDICTS } from './scenario';

const log = (message: string) => console.log(`Kinefold demo: ${message}`);

const POLL_MS = 5000;
const WAITING_STATES = ['queued', 'processing'];

/** Resolves after `ms`, or at once when the server stops (the signal aborts). */
function pause(ms: number, signal: AbortSignal): Promise<void> {
  return sleep(ms, undefined, { signal }).catch(() => undefined);
}

/** Waits until the worker has processed every clip the demo curator decides; false when the server stopped first. */
async function waitForProcessing(files: string[], signal: AbortSignal): Promise<boolean> {
  let reported = -1;
  while (!signal.aborted) {
    const waiting = await Clip.count({ where: { originalName: files, state: WAITING_STATES } });
    if (waiting === 0) return true;
    if (waiting !== reported) log(`waiting for the worker: ${waiting} of the clips to review still processing…`);
    reported = waiting;
    await pause(POLL_MS, signal);
  }
  return false;
}

/**
 * After the footage is in: the engineer's token and the admin's invitation; once the worker has processed the
 * clips, the demo curator gives the scenario's verdicts (claiming each clip as the review screen does); then the
 * demo engineer defines the demo pairset from the accepted orchard clips and queues its build, and once it is
 * built a storage measure is queued. Each step is skipped when done already, so an interrupted first start
 * finishes on the next.
 */
export async function curateDemoCampaign(config: Config, signal: AbortSignal): Promise<void> {
  const curator = await User.findByEmail('curator@kinefold.test');
  const engineer = await User.findByEmail('engineer@kinefold.test');
  const admin = await User.findByEmail('admin@kinefold.test');
  if (!curator || !engineer || !admin) return;
  await addPaperwork(config, engineer, admin);
  const files = DEMO_VERDICTS.map((verdict) => verdict.file);
  if (!(await waitForProcessing(files, signal))) return;

  const clips = await Clip.findAll({ where: { originalName: files } });
  for (const verdict of DEMO_VERDICTS) {
    const clip = clips.find((candidate) => candidate.originalName === verdict.file);
    if (!clip || clip.state !== 'awaiting_review') continue;
    await claimClip(clip.id, curator);
    await decideClip(
      clip.id,
      { decision: verdict.decision, reason: verdict.reason, comment: verdict.comment },
      curator,
    );
    log(`${curator.name} ${verdict.decision === 'accept' ? 'accepted' : 'rejected'} ${verdict.file}`);
  }

  const defined = await Pairset.findOne({ where: { name: DEMO_PAIRSET.name } });
  if (!defined) await buildDemoPairset(engineer, signal);
  // A start stopped between defining the pairset and queuing its build.
  else if (defined.state === 'draft') await startBuild(defined.id, engineer);
  const built = await waitForPairset(signal);
  if (!built?.builtAt) return;
  // Measures every byte by kind for the storage screen now, as an admin's "Reconcile now" would, rather than at
  // the worker's next scheduled measure.
  const measured = await Job.count({ where: { kind: 'reconcile-usage', createdAt: { [Op.gte]: built.builtAt } } });
  if (measured === 0) {
    await requestReconcile('on-demand', admin.id);
    log('the pairset is built and a storage measure is queued; the demo campaign is complete.');
  }
}

/**
 * What a team has around its footage: an API token the engineer made for a training machine (its secret was
 * shown once and is gone, as for any token) and an invitation the admin sent to a field hand who has not joined.
 */
async function addPaperwork(config: Config, engineer: User, admin: User): Promise<void> {
  if (!(await ApiToken.findOne({ where: { userId: engineer.id, name: DEMO_TOKEN_NAME } }))) {
    await createApiToken(engineer.id, DEMO_TOKEN_NAME);
  }
  if (!(await Invitation.findOne({ where: { email: DEMO_INVITATION.email } }))) {
    await createInvitation(DEMO_INVITATION, admin, config);
    log(`${admin.name} invited ${DEMO_INVITATION.email}; the invitation is in the mail log.`);
  }
}

async function buildDemoPairset(engineer: User, signal: AbortSignal): Promise<void> {
  const orchard = await Project.findOne({ where: { name: DEMO_PROJECTS[0].name } });
  if (!orchard) return;
  const clustering = await demoClustering(orchard.id, engineer, signal);
  if (!clustering) return;
  const pairset = await createPairset(
    {
      ...DEMO_PAIRSET,
      views: [...DEMO_PAIRSET.views],
      projectIds: [orchard.id],
      motionFormat: PAIRSET_DEFAULTS.motionFormat,
      temperature: PAIRSET_DEFAULTS.temperature,
      diversity: {
        clusteringId: clustering.id,
        capShare: DEMO_BALANCE.capShare,
        mixClusters: DEMO_BALANCE.mixClusters,
      },
    },
    engineer.id,
  );
  await startBuild(pairset.id, engineer);
  log(`${engineer.name} queued the build of pairset "${DEMO_PAIRSET.name}" v1 (${pairset.id}); the worker builds it.`);
}

/** The orchard's clustering (queued by the engineer, run by the worker) once done; null when it failed or stopped. */
async function demoClustering(projectId: number, engineer: User, signal: AbortSignal): Promise<Clustering | null> {
  const existing = (await Clustering.findAll({ order: [['id', 'DESC']] })).find(
    (clustering) => clustering.projectIds.length === 1 && clustering.projectIds[0] === projectId,
  );
  const id =
    existing?.id ??
    (
      await createClustering(
        clusteringCreateSchema.parse({ projectIds: [projectId], k: DEMO_BALANCE.k, seed: DEMO_BALANCE.clusteringSeed }),
        engineer.id,
      )
    ).id;
  if (!existing) log(`${engineer.name} queued a clustering of the orchard's moments to balance the pairset.`);
  while (!signal.aborted) {
    const clustering = await Clustering.findByPk(id);
    if (!clustering || clustering.state === 'failed') return null;
    if (clustering.state === 'done') return clustering;
    await pause(POLL_MS, signal);
  }
  return null;
}

/** Waits for the demo pairset's build to end; null when the server stopped first. */
async function waitForPairset(signal: AbortSignal): Promise<Pairset | null> {
  while (!signal.aborted) {
    const pairset = await Pairset.findOne({ where: { name: DEMO_PAIRSET.name }, order: [['version', 'DESC']] });
    if (!pairset || pairset.state !== 'building') return pairset;
    await pause(POLL_MS, signal);
  }
  return null;
}
