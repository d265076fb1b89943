import { Router, type Request, type Response } from 'express';
import type { InvitationPreview, InvitationSummary, ListPage, Me } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import {
  acceptInvitationSchema, invitationListQuerySchema, invitationTokenParamsSchema, inviteSchema,
  type AcceptInvitationBody, type InvitationListQuery, type InviteBody,
} from '../../shared/schemas/invitations';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import type { Config } from '../core/config';
import { currentUser, requireRole } from '../middlewares/auth';
import { validate } from '../middlewares/validate';
import {
  acceptInvitation, createInvitation, listInvitations, previewInvitation, resendInvitation, revokeInvitation,
} from '../core/people/invitations';
import { recordSignIn } from '../core/people/users';

type TokenParams = { token: string };

/** Admins invite, list, re-send and revoke; the person invited opens and accepts their link signed out. */
export function createInvitationsRouter(config: Config): Router {
  const router = Router();
  router.get('/', requireRole('admin'), validate({ query: invitationListQuerySchema }), getInvitations);
  router.post('/', requireRole('admin'), validate({ body: inviteSchema }), invite(config));
  router.post('/:id/resend', requireRole('admin'), validate({ params: idParamSchema }), resend(config));
  router.post('/:id/revoke', requireRole('admin'), validate({ params: idParamSchema }), revoke);
  router.get('/:token', validate({ params: invitationTokenParamsSchema }), getPreview);
  router.post('/:token/accept', validate({ params: invitationTokenParamsSchema, body: acceptInvitationSchema }),
    accept(config));
  return router;
}

async function getInvitations(req: Request, res: Response<ListPage<InvitationSummary>>): Promise<void> {
  res.json(await listInvitations(req.valid.query as InvitationListQuery));
}

function invite(config: Config) {
  return async (req: Request, res: Response<InvitationSummary>) => {
    const invitation = await createInvitation(req.valid.body as InviteBody, currentUser(req), config);
    res.status(HttpStatus.CREATED).json(invitation);
  };
}

function resend(config: Config) {
  return async (req: Request, res: Response<InvitationSummary>) => {
    res.json(await resendInvitation((req.valid.params as IdParam).id, currentUser(req), config));
  };
}

async function revoke(req: Request, res: Response<InvitationSummary>): Promise<void> {
  res.json(await revokeInvitation((req.valid.params as IdParam).id, currentUser(req)));
}

async function getPreview(req: Request, res: Response<InvitationPreview>): Promise<void> {
  res.json(await previewInvitation((req.valid.params as TokenParams).token));
}

/** Creates the account, then signs the person in (passport gives the session a new id). */
function accept(config: Config) {
  return async (req: Request, res: Response<Me>) => {
    const user = await acceptInvitation(
      (req.valid.params as TokenParams).token,
      req.valid.body as AcceptInvitationBody,
      config.bcryptCost,
    );
    await new Promise<void>((resolve, reject) => req.logIn(user, (error) => (error ? reject(error) : resolve())));
    await recordSignIn(user);
    res.status(HttpStatus.CREATED).json(user.toApi());
  };
}
