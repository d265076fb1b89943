import { Op, type Transaction } from 'sequelize';
import { Session } from '../models';

/** Ends every browser session of a user except `keepSid` (the one making the request, if it is theirs). */
export async function endSessionsOf(userId: number, keepSid: string | null, transaction: Transaction): Promise<number> {
  return Session.destroy({
    where: { userId, ...(keepSid ? { sid: { [Op.ne]: keepSid } } : {}) },
    transaction,
  });
}
