import { Router, type Request, type Response } from 'express';
import type { ListPage } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import {
  tokenBodySchema, tokenListQuerySchema, type TokenBody, type TokenListQuery,
} from '../../shared/schemas/tokens';
import type { ApiTokenSummary, CreatedApiToken } from '../../shared/types/pairsets';
import { currentUser, requireRole } from '../middlewares/auth';
import { validate } from '../middlewares/validate';
import { createApiToken, listApiTokens, revokeApiToken } from '../core/people/api-tokens';

/** The signed-in engineer's API tokens under /api/tokens (admins pass). A token itself never opens these. */
export const tokensRouter = Router();

tokensRouter.post('/', requireRole('engineer'), validate({ body: tokenBodySchema }), postToken);
tokensRouter.get('/', requireRole('engineer'), validate({ query: tokenListQuerySchema }), getTokens);
tokensRouter.delete('/:id', requireRole('engineer'), validate({ params: idParamSchema }), deleteToken);

async function postToken(req: Request, res: Response<CreatedApiToken>): Promise<void> {
  const created = await createApiToken(currentUser(req).id, (req.valid.body as TokenBody).name);
  res.status(HttpStatus.CREATED).json(created);
}

async function getTokens(req: Request, res: Response<ListPage<ApiTokenSummary>>): Promise<void> {
  res.json(await listApiTokens(currentUser(req).id, req.valid.query as TokenListQuery));
}

async function deleteToken(req: Request, res: Response<ApiTokenSummary>): Promise<void> {
  res.json(await revokeApiToken((req.valid.params as IdParam).id, currentUser(req)));
}
