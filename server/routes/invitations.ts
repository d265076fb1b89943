import { Router, type Request, type Response } from 'express';
import type { z } from 'zod';
import type { InvitationPreview, InvitationSummary, ListPage, Me } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import {
  acceptInvitationSchema,
  invitationListQuerySchema,
  invitationTokenParamsSchema,
  inviteSchema,
  type AcceptInvitationBody,
  type InvitationListQuery,
  type InviteBody,
} from '../../shared/schemas/invitations';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import type { Config } from '../core/config';
import { currentUser, requireRole } from '../middlewares/auth';
import { validated } from '../middlewares/validate';
import {
  acceptInvitation,
  createInvitation,
  listInvitations,
  previewInvitation,
  resendInvitation,
  revokeInvitation,
} from '../core/people/invitations';
import { recordSignIn } from '../core/people/users';

/** The shared schemas name no type for the link's params; this one follows the schema. */
type TokenParams = z.output<typeof invitationTokenParamsSchema>;

/** Admins invite, list, re-send and revoke; the person invited opens and accepts their link signed out. */
export function createInvitationsRouter(config: Config): Router {
  const router = Router();
  router.get('/', requireRole('admin'), validated({ query: invitationListQuerySchema }, getInvitations));
  router.post('/', requireRole('admin'), validated({ body: inviteSchema }, invite(config)));
  router.post('/:id/resend', requireRole('admin'), validated({ params: idParamSchema }, resend(config)));
  router.post('/:id/revoke', requireRole('admin'), validated({ params: idParamSchema }, revoke));
  router.get('/:token', validated({ params: invitationTokenParamsSchema }, getPreview));
  router.post(
    '/:token/accept',
    validated({ params: invitationTokenParamsSchema, body: acceptInvitationSchema }, accept(config)),
  );
  return router;
}

async function getInvitations(
  { query }: { query: InvitationListQuery },
  _req: Request,
  res: Response<ListPage<InvitationSummary>>,
): Promise<void> {
  res.json(await listInvitations(query));
}

function invite(config: Config) {
  return async ({ body }: { body: InviteBody }, req: Request, res: Response<InvitationSummary>) => {
    const invitation = await createInvitation(body, currentUser(req), config);
    res.status(HttpStatus.CREATED).json(invitation);
  };
}

function resend(config: Config) {
  return async ({ params }: { params: IdParam }, req: Request, res: Response<InvitationSummary>) => {
    res.json(await resendInvitation(params.id, currentUser(req), config));
  };
}

async function revoke({ params }: { params: IdParam }, req: Request, res: Response<InvitationSummary>): Promise<void> {
  res.json(await revokeInvitation(params.id, currentUser(req)));
}

async function getPreview(
  { params }: { params: TokenParams },
  _req: Request,
  res: Response<InvitationPreview>,
): Promise<void> {
  res.json(await previewInvitation(params.token));
}

/** Creates the account, then signs the person in (passport gives the session a new id). */
function accept(config: Config) {
  return async (
    { params, body }: { params: TokenParams; body: AcceptInvitationBody },
    req: Request,
    res: Response<Me>,
  ) => {
    const user = await acceptInvitation(params.token, body, config.bcryptCost);
    await new Promise<void>((resolve, reject) => req.logIn(user, (error) => (error ? reject(error) : resolve())));
    await recordSignIn(user);
    res.status(HttpStatus.CREATED).json(user.toApi());
  };
}
