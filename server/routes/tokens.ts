import { Router, type Request, type Response } from 'express';
import type { ListPage } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { idParamSchema, type IdParam } from '../../shared/schemas/params';
import {
  tokenBodySchema,
  tokenListQuerySchema,
  type TokenBody,
  type TokenListQuery,
} from '../../shared/schemas/tokens';
import type { ApiTokenSummary, CreatedApiToken } from '../../shared/types/pairsets';
import { currentUser, requireRole } from '../middlewares/auth';
import { validated } from '../middlewares/validate';
import { createApiToken, listApiTokens, revokeApiToken } from '../core/people/api-tokens';

/** The signed-in engineer's API tokens under /api/tokens (admins pass). A token itself never opens these. */
export const tokensRouter = Router();

tokensRouter.post('/', requireRole('engineer'), validated({ body: tokenBodySchema }, postToken));
tokensRouter.get('/', requireRole('engineer'), validated({ query: tokenListQuerySchema }, getTokens));
tokensRouter.delete('/:id', requireRole('engineer'), validated({ params: idParamSchema }, deleteToken));

async function postToken({ body }: { body: TokenBody }, req: Request, res: Response<CreatedApiToken>): Promise<void> {
  const created = await createApiToken(currentUser(req).id, body.name);
  res.status(HttpStatus.CREATED).json(created);
}

async function getTokens(
  { query }: { query: TokenListQuery },
  req: Request,
  res: Response<ListPage<ApiTokenSummary>>,
): Promise<void> {
  res.json(await listApiTokens(currentUser(req).id, query));
}

async function deleteToken(
  { params }: { params: IdParam },
  req: Request,
  res: Response<ApiTokenSummary>,
): Promise<void> {
  res.json(await revokeApiToken(params.id, currentUser(req)));
}
