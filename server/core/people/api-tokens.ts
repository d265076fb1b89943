import { createHash, randomBytes, timingSafeEqual } from 'node:crypto';
import type { ListPage } from '../../../shared/api-types';
import { HttpStatus } from '../../../shared/http-status';
import type { AllTokensQuery, TokenListQuery } from '../../../shared/schemas/tokens';
import type { ApiTokenSummary, CreatedApiToken, OwnedApiTokenSummary } from '../../../shared/types/pairsets';
import { AppError, conflict, notFound } from '../errors';
import { ApiToken, User } from '../models';
import { recordAudit } from '../audit/audit';

/**
 * API tokens for scripts: `kft_<8 hex>_<43 base64url>`. The first part (`kft_` and 8 hex digits) is the visible
 * prefix that finds the row; the rest is 256 random bits. Only a SHA-256 of the whole token is stored: like a
 * link token, it cannot be guessed, so a slow password hash would add nothing (common practice for API tokens).
 */
const TOKEN_TAG = 'kft_';
const PREFIX_BYTES = 4;
const SECRET_BYTES = 32;
const TOKEN_PATTERN = /^kft_[0-9a-f]{8}_[A-Za-z0-9_-]{43}$/;
const PREFIX_LENGTH = TOKEN_TAG.length + 2 * PREFIX_BYTES;
/** A token used again within this long keeps its recorded last use, so a script's many downloads write once. */
const LAST_USED_RESOLUTION_MS = 60_000;

const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');

export async function createApiToken(userId: number, name: string): Promise<CreatedApiToken> {
  const prefix = `${TOKEN_TAG}${randomBytes(PREFIX_BYTES).toString('hex')}`;
  const token = `${prefix}_${randomBytes(SECRET_BYTES).toString('base64url')}`;
  const created = await ApiToken.sequelize!.transaction(async (transaction) => {
    // 2^32 prefixes: a clash is rare, and the unique index turns one into an error rather than a shared prefix.
    if (await ApiToken.findOne({ where: { prefix }, transaction })) {
      throw conflict('token_prefix_taken', 'Two tokens drew the same prefix; create the token again.');
    }
    const row = await ApiToken.create({ userId, name, prefix, tokenHash: hashToken(token) }, { transaction });
    await recordAudit(
      { actorId: userId, action: 'token.create', targetType: 'api_token', targetId: row.id, detail: { name, prefix } },
      transaction,
    );
    return row;
  });
  return { ...created.toApi(), token };
}

/** Newest first unless `sort` says otherwise; id breaks ties. */
function tokenOrder(sort: string | undefined): [string, 'ASC' | 'DESC'][] {
  const field = sort?.replace(/^-/, '') ?? 'createdAt';
  const direction = sort && !sort.startsWith('-') ? 'ASC' : 'DESC';
  return [
    [field, direction],
    ['id', direction],
  ];
}

export async function listApiTokens(userId: number, query: TokenListQuery): Promise<ListPage<ApiTokenSummary>> {
  const { rows, count } = await ApiToken.findAndCountAll({
    where: { userId },
    order: tokenOrder(query.sort),
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  });
  return { items: rows.map((row) => row.toApi()), total: count, page: query.page, pageSize: query.pageSize };
}

/** Every person's tokens with their owners, for admins: a token left behind by someone can be found and revoked. */
export async function listAllApiTokens(query: AllTokensQuery): Promise<ListPage<OwnedApiTokenSummary>> {
  const { rows, count } = await ApiToken.findAndCountAll({
    where: query.userId ? { userId: query.userId } : {},
    include: [{ model: User, as: 'user', attributes: ['id', 'name', 'email'] }],
    order: tokenOrder(query.sort),
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  });
  const items = rows.map((row) => {
    const owner = row.get('user') as User;
    return { ...row.toApi(), ownerId: owner.id, ownerName: owner.name, ownerEmail: owner.email };
  });
  return { items, total: count, page: query.page, pageSize: query.pageSize };
}

/** Revokes one of the person's own tokens (an admin may revoke anyone's); from then on it answers 401. */
export async function revokeApiToken(id: number, actor: User): Promise<ApiTokenSummary> {
  return ApiToken.sequelize!.transaction(async (transaction) => {
    const token = await ApiToken.findByPk(id, { transaction });
    if (!token || (token.userId !== actor.id && actor.role !== 'admin')) throw notFound(`API token ${id}`);
    if (token.revokedAt) throw conflict('token_revoked', `API token ${token.prefix}… was revoked already.`);
    await token.update({ revokedAt: new Date() }, { transaction });
    await recordAudit(
      {
        actorId: actor.id,
        action: 'token.revoke',
        targetType: 'api_token',
        targetId: id,
        detail: { prefix: token.prefix, ownerId: token.userId },
      },
      transaction,
    );
    return token.toApi();
  });
}

const invalidToken = () =>
  new AppError(
    HttpStatus.UNAUTHORIZED,
    'token_invalid',
    'This API token is unknown or revoked; create a new one on the API tokens page.',
  );

/** The active user a token belongs to; 401 for a malformed, unknown or revoked token or a disabled account. */
export async function authenticateApiToken(token: string): Promise<User> {
  if (!TOKEN_PATTERN.test(token)) throw invalidToken();
  const row = await ApiToken.findOne({ where: { prefix: token.slice(0, PREFIX_LENGTH) } });
  const expected = Buffer.from(row?.tokenHash ?? hashToken(''), 'hex');
  const matches = timingSafeEqual(Buffer.from(hashToken(token), 'hex'), expected);
  if (!row || !matches || row.revokedAt) throw invalidToken();
  const user = await User.findByPk(row.userId);
  if (!user || user.disabled) throw invalidToken();
  const now = new Date();
  if (!row.lastUsedAt || now.getTime() - row.lastUsedAt.getTime() >= LAST_USED_RESOLUTION_MS) {
    await ApiToken.update({ lastUsedAt: now }, { where: { id: row.id } });
  }
  return user;
}
