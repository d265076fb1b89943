import { Op, type Transaction } from 'sequelize';
import { Clip, Project, QuotaWarning, User } from '../models';
import { queueMail } from '../mail/outbox';
import { projectUsage, userUsage } from './quotas';

/** Shares of a quota at which admins and the operators concerned are told, once per crossing. */
export const WARNING_PERCENTS = [80, 100] as const;

interface Scope {
  scope: 'project' | 'user';
  scopeId: number;
  label: string;
  quotaBytes: number | null;
  usedBytes: number;
  /** Who is told besides the admins: the project's operators, or the person whose quota it is. */
  operators: User[];
}

/**
 * After bytes were added (an upload, a processing stage): records each threshold newly crossed and queues one
 * message per crossing to the admins and the operators concerned, in the caller's transaction. A threshold whose
 * usage fell back below it is forgotten, so the next crossing is told again.
 */
export async function checkQuotaThresholds(
  projectId: number,
  userId: number,
  publicUrl: string,
  transaction: Transaction,
): Promise<void> {
  const project = await Project.findByPk(projectId, { transaction });
  if (!project) return;
  const projectOperators = await User.findAll({
    where: {
      id: {
        [Op.in]: Clip.sequelize!.literal(
          `(SELECT DISTINCT "uploaderId" FROM clips WHERE "projectId" = ${Number(projectId)})`,
        ),
      },
      role: 'operator',
      disabled: false,
    },
    transaction,
  });
  const admins = await adminsOf(transaction);
  await checkScope(
    {
      scope: 'project',
      scopeId: project.id,
      label: `Project "${project.name}"`,
      quotaBytes: project.quotaBytes,
      usedBytes: (await projectUsage(project.id, transaction)).stored,
      operators: projectOperators,
    },
    admins,
    publicUrl,
    transaction,
  );
  await checkUserQuotaThresholds(userId, publicUrl, transaction, admins);
}

/** The same for one person's quota alone: after a pairset of theirs is built, its bytes count against them. */
export async function checkUserQuotaThresholds(
  userId: number,
  publicUrl: string,
  transaction: Transaction,
  admins?: User[],
): Promise<void> {
  const user = await User.findByPk(userId, { transaction });
  if (!user) return;
  await checkScope(
    {
      scope: 'user',
      scopeId: user.id,
      label: `The account of ${user.name}`,
      quotaBytes: user.quotaBytes,
      usedBytes: (await userUsage(user.id, transaction)).stored,
      operators: [user],
    },
    admins ?? (await adminsOf(transaction)),
    publicUrl,
    transaction,
  );
}

function adminsOf(transaction: Transaction): Promise<User[]> {
  return User.findAll({ where: { role: 'admin', disabled: false }, transaction });
}

async function checkScope(scope: Scope, admins: User[], publicUrl: string, transaction: Transaction): Promise<void> {
  const { scope: kind, scopeId } = scope;
  const quota = scope.quotaBytes === null ? null : Number(scope.quotaBytes);
  const share = quota === null ? 0 : quota === 0 ? Infinity : (scope.usedBytes / quota) * 100;
  for (const percent of WARNING_PERCENTS) {
    const existing = await QuotaWarning.findOne({ where: { scope: kind, scopeId, percent }, transaction });
    if (share < percent) {
      if (existing) await existing.destroy({ transaction });
      continue;
    }
    if (existing) continue;
    await QuotaWarning.create({ scope: kind, scopeId, percent, crossedAt: new Date() }, { transaction });
    const recipients = new Map([...admins, ...scope.operators].map((person) => [person.email, person]));
    for (const person of recipients.values()) {
      await queueMail(
        {
          to: person.email,
          template: 'quota-threshold',
          data: {
            name: person.name,
            subjectLabel: scope.label,
            percent,
            usedBytes: scope.usedBytes,
            quotaBytes: quota!,
          },
        },
        { transaction, publicUrl },
      );
    }
  }
}
