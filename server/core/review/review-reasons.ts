import type { Transaction } from 'sequelize';
import {
  DEFAULT_REJECT_REASONS,
  REJECT_REASONS_SETTING,
  type RejectReason,
} from '../../../shared/review/reject-reasons';
import type { RejectReasonsBody } from '../../../shared/schemas/review';
import type { RejectReasonList } from '../../../shared/types/review';
import { badRequest } from '../errors';
import { Setting } from '../models';
import { recordAudit } from '../audit/audit';

/** The reject reasons in force: the admins' list once one was saved, the default list until then. */
export async function rejectReasons(transaction?: Transaction): Promise<RejectReason[]> {
  const row = await Setting.findByPk(REJECT_REASONS_SETTING, { transaction });
  return row ? (row.value as RejectReason[]) : DEFAULT_REJECT_REASONS.map((reason) => ({ ...reason }));
}

export async function listRejectReasons(): Promise<RejectReasonList> {
  return { reasons: await rejectReasons() };
}

/**
 * Replaces the list. Verdicts keep the code and the words they were given with, so removing or rewording a
 * reason never changes what an earlier verdict says.
 */
export async function replaceRejectReasons(body: RejectReasonsBody, actorId: number): Promise<RejectReasonList> {
  await Setting.sequelize!.transaction(async (transaction) => {
    const before = await rejectReasons(transaction);
    await Setting.upsert({ key: REJECT_REASONS_SETTING, value: body.reasons, updatedById: actorId }, { transaction });
    await recordAudit(
      {
        actorId,
        action: 'settings.reject_reasons',
        targetType: 'setting',
        targetId: REJECT_REASONS_SETTING,
        detail: { before: before.map((r) => r.code), after: body.reasons.map((r) => r.code) },
      },
      transaction,
    );
  });
  return listRejectReasons();
}

/** The reason with this code in the list in force; a 400 naming the codes there are when it is not. */
export async function reasonByCode(code: string, transaction: Transaction): Promise<RejectReason> {
  const reasons = await rejectReasons(transaction);
  const reason = reasons.find((candidate) => candidate.code === code);
  if (!reason) {
    throw badRequest(
      'unknown_reason',
      `reason: "${code}" is not in the reject-reasons list (${reasons.map((r) => r.code).join(', ')}).`,
    );
  }
  return reason;
}
