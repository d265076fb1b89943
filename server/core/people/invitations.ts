import { Op, UniqueConstraintError, type Order, type WhereOptions } from 'sequelize';
import type { InvitationPreview, InvitationState, InvitationSummary, ListPage } from '../../../shared/api-types';
import { HttpStatus } from '../../../shared/http-status';
import type { AcceptInvitationBody, InvitationListQuery, InviteBody } from '../../../shared/schemas/invitations';
import type { Config } from '../config';
import { AppError, conflict, notFound } from '../errors';
import { queueMail } from '../mail/outbox';
import { Invitation, User } from '../models';
import { recordAudit } from '../audit/audit';
import { hashOneTimeToken, newOneTimeToken } from './one-time-tokens';
import { assertPasswordAcceptable, hashPassword } from './passwords';
import { containsText } from '../db/text-search';

export const INVITATION_TTL_MS = 72 * 3600_000;

type MailSettings = Pick<Config, 'publicUrl'>;

/** Loads who sent an invitation along with it, for the list and the answers. */
const WITH_INVITER = { model: User, as: 'invitedBy', attributes: ['id', 'name'] };

/** Invites someone by e-mail: the invitation and its mail are written together, or neither is. */
export async function createInvitation(
  input: InviteBody,
  inviter: User,
  config: MailSettings,
): Promise<InvitationSummary> {
  const { email } = input;
  if (await User.findByEmail(email)) {
    throw conflict('email_taken', `${email} already has a Kinefold account.`, { field: 'email' });
  }
  const { token, tokenHash } = newOneTimeToken();
  const now = new Date();
  try {
    const invitation = await Invitation.sequelize!.transaction(async (transaction) => {
      const open = await Invitation.findOne({ where: { email, acceptedAt: null, revokedAt: null }, transaction });
      if (open) throw alreadyInvited(email);
      const created = await Invitation.create(
        {
          email,
          role: input.role,
          tokenHash,
          invitedById: inviter.id,
          lastSentAt: now,
          expiresAt: new Date(now.getTime() + INVITATION_TTL_MS),
        },
        { transaction },
      );
      await queueMail(
        {
          to: email,
          template: 'invitation',
          data: { inviterName: inviter.name, role: input.role, token, expiresAt: created.expiresAt },
        },
        { transaction, publicUrl: config.publicUrl },
      );
      await recordAudit(
        {
          actorId: inviter.id,
          action: 'invitation.create',
          targetType: 'invitation',
          targetId: created.id,
          detail: { email, role: input.role },
        },
        transaction,
      );
      return created;
    });
    invitation.invitedBy = inviter;
    return invitation.toApi(now);
  } catch (error) {
    // Another admin may have invited the same address between the check and the insert.
    if (error instanceof UniqueConstraintError) throw alreadyInvited(email);
    throw error;
  }
}

function alreadyInvited(email: string) {
  return conflict('already_invited', `${email} already has an open invitation; re-send or revoke it instead.`, {
    field: 'email',
  });
}

export async function listInvitations(query: InvitationListQuery): Promise<ListPage<InvitationSummary>> {
  const now = new Date();
  const where: WhereOptions<Invitation> = {
    [Op.and]: [
      query.state ? Invitation.stateCondition(query.state, now) : {},
      // Qualified: the inviter's row joined in has an email column too.
      query.search ? containsText<Invitation>(Invitation.sequelize!, ['Invitation.email'], query.search) : {},
    ],
  };
  const sort = query.sort ?? '-createdAt';
  const order: Order = [
    [sort.replace(/^-/, ''), sort.startsWith('-') ? 'DESC' : 'ASC'],
    ['id', 'DESC'],
  ];
  const { rows, count } = await Invitation.findAndCountAll({
    where,
    order,
    include: [WITH_INVITER],
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  });
  return { items: rows.map((row) => row.toApi(now)), total: count, page: query.page, pageSize: query.pageSize };
}

async function findOpenInvitation(id: number, verb: string): Promise<Invitation> {
  const invitation = await Invitation.findByPk(id, { include: [WITH_INVITER] });
  if (!invitation) throw notFound('Invitation');
  if (!invitation.isOpen) {
    const state = invitation.stateAt(new Date());
    throw conflict('invitation_closed', `This invitation was already ${state}; it cannot be ${verb}.`);
  }
  return invitation;
}

/** Sends a fresh link (the old one stops working, since only hashes are kept) valid for another 72 hours. */
export async function resendInvitation(id: number, actor: User, config: MailSettings): Promise<InvitationSummary> {
  const invitation = await findOpenInvitation(id, 're-sent');
  const { token, tokenHash } = newOneTimeToken();
  const now = new Date();
  const expiresAt = new Date(now.getTime() + INVITATION_TTL_MS);
  await Invitation.sequelize!.transaction(async (transaction) => {
    const [updated] = await Invitation.update(
      { tokenHash, lastSentAt: now, expiresAt },
      { where: { id, acceptedAt: null, revokedAt: null }, transaction },
    );
    if (updated === 0) throw conflict('invitation_closed', 'This invitation was used or revoked meanwhile.');
    await queueMail(
      {
        to: invitation.email,
        template: 'invitation',
        data: { inviterName: actor.name, role: invitation.role, token, expiresAt },
      },
      { transaction, publicUrl: config.publicUrl },
    );
    await recordAudit(
      {
        actorId: actor.id,
        action: 'invitation.resend',
        targetType: 'invitation',
        targetId: id,
        detail: { email: invitation.email },
      },
      transaction,
    );
  });
  await invitation.reload({ include: [WITH_INVITER] });
  return invitation.toApi(now);
}

export async function revokeInvitation(id: number, actor: User): Promise<InvitationSummary> {
  const invitation = await findOpenInvitation(id, 'revoked');
  const now = new Date();
  await Invitation.sequelize!.transaction(async (transaction) => {
    const [updated] = await Invitation.update(
      { revokedAt: now },
      { where: { id, acceptedAt: null, revokedAt: null }, transaction },
    );
    if (updated === 0) throw conflict('invitation_closed', 'This invitation was used or revoked meanwhile.');
    await recordAudit(
      {
        actorId: actor.id,
        action: 'invitation.revoke',
        targetType: 'invitation',
        targetId: id,
        detail: { email: invitation.email },
      },
      transaction,
    );
  });
  await invitation.reload({ include: [WITH_INVITER] });
  return invitation.toApi(now);
}

/** The invitation a link points at, while it can still be used; otherwise a 404 or 410 saying why not. */
async function findUsableInvitation(token: string, now: Date): Promise<Invitation> {
  const invitation = await Invitation.findByTokenHash(hashOneTimeToken(token));
  if (!invitation) {
    throw new AppError(
      HttpStatus.NOT_FOUND,
      'invitation_not_found',
      'This invitation link is not valid. Check that you opened the whole link from the message, or ask an admin ' +
        'to send it again.',
    );
  }
  const state = invitation.stateAt(now);
  if (state !== 'pending') throw invitationGone(state, invitation);
  return invitation;
}

/** Why a link can no longer be used; `pending` here means an admin re-sent it with a newer link meanwhile. */
function invitationGone(state: InvitationState, invitation: Invitation): AppError {
  const [code, message] = {
    pending: ['invitation_replaced', 'This link was replaced by a newer invitation; open the most recent message.'],
    accepted: [
      'invitation_used',
      'This invitation has already been used. Sign in with the password you chose, ' +
        'or use "Forgot password?" on the sign-in page.',
    ],
    revoked: [
      'invitation_revoked',
      'This invitation was withdrawn by an admin. Ask them for a new one if you ' + 'still need access.',
    ],
    expired: [
      'invitation_expired',
      `This invitation expired on ${invitation.expiresAt.toUTCString()}. Ask an ` + 'admin to send it again.',
    ],
  }[state] as [string, string];
  return new AppError(HttpStatus.GONE, code, message);
}

export async function previewInvitation(token: string): Promise<InvitationPreview> {
  const invitation = await findUsableInvitation(token, new Date());
  return { email: invitation.email, role: invitation.role, expiresAt: invitation.expiresAt.toISOString() };
}

/**
 * Turns an invitation into an account. The conditional update takes the invitation exactly once, so two
 * clicks on the same link (or a revoke at the same moment) cannot both succeed.
 */
export async function acceptInvitation(token: string, input: AcceptInvitationBody, bcryptCost: number): Promise<User> {
  const invitation = await findUsableInvitation(token, new Date());
  assertPasswordAcceptable(input.password, invitation.email);
  const passwordHash = await hashPassword(input.password, bcryptCost);
  const now = new Date();
  return Invitation.sequelize!.transaction(async (transaction) => {
    const [taken] = await Invitation.update(
      { acceptedAt: now },
      {
        where: {
          id: invitation.id,
          tokenHash: invitation.tokenHash,
          acceptedAt: null,
          revokedAt: null,
          expiresAt: { [Op.gt]: now },
        },
        transaction,
      },
    );
    if (taken === 0) {
      await invitation.reload({ transaction });
      throw invitationGone(invitation.stateAt(now), invitation);
    }
    if (await User.findOne({ where: { email: invitation.email }, transaction })) {
      throw conflict('email_taken', `${invitation.email} already has a Kinefold account; sign in instead.`);
    }
    const user = await User.create(
      { email: invitation.email, name: input.name, role: invitation.role, passwordHash },
      { transaction },
    );
    await recordAudit(
      {
        actorId: user.id,
        action: 'invitation.accept',
        targetType: 'invitation',
        targetId: invitation.id,
        detail: { email: invitation.email, role: invitation.role, userId: user.id },
      },
      transaction,
    );
    await recordAudit(
      {
        actorId: invitation.invitedById,
        action: 'user.create',
        targetType: 'user',
        targetId: user.id,
        detail: { email: invitation.email, role: invitation.role, invitationId: invitation.id },
      },
      transaction,
    );
    return user;
  });
}
