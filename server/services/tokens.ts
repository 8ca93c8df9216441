import { createHash, randomBytes } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { ApiError } from '../errors';
import { ApiToken, type User } from '../db/entities';
import type { CreateTokenBody, CreatedToken, TokenSummary } from '../../shared/api/accounts';

export const TOKEN_PREFIX = 'infall_';
const MAX_TOKENS_PER_USER = 20;
// lastUsedAt is a hint for people, so it is written at most this often.
const TOUCH_EVERY_MS = 60_000;
const DAY_MS = 86_400_000;

const hashOf = (secret: string) => createHash('sha256').update(secret).digest('hex');

export function toTokenSummary(t: ApiToken): TokenSummary {
  return { id: t.id, name: t.name, prefix: t.prefix, createdAt: t.createdAt.toISOString(), lastUsedAt: t.lastUsedAt ? t.lastUsedAt.toISOString() : null, expiresAt: t.expiresAt.toISOString() };
}

export async function createToken(em: EntityManager, user: User, { name, expiresInDays }: CreateTokenBody): Promise<CreatedToken> {
  if ((await em.count(ApiToken, { user: user.id })) >= MAX_TOKENS_PER_USER) {
    throw new ApiError('CONFLICT', `You already have ${MAX_TOKENS_PER_USER} tokens; revoke one first`);
  }
  const secret = TOKEN_PREFIX + randomBytes(32).toString('base64url');
  const expiresAt = new Date(Date.now() + expiresInDays * DAY_MS);
  const token = em.create(ApiToken, { user: user.id, name, prefix: secret.slice(0, TOKEN_PREFIX.length + 6), hash: hashOf(secret), expiresAt });
  await em.flush();
  return { token: toTokenSummary(token), secret };
}

export async function listTokens(em: EntityManager, user: User): Promise<TokenSummary[]> {
  const tokens = await em.find(ApiToken, { user: user.id }, { orderBy: { createdAt: 'desc' } });
  return tokens.map(toTokenSummary);
}

export async function revokeToken(em: EntityManager, user: User, id: number): Promise<void> {
  const deleted = await em.nativeDelete(ApiToken, { id, user: user.id });
  if (!deleted) throw new ApiError('NOT_FOUND', `No token ${id} of yours`);
}

/** The user a bearer secret belongs to, or null when it is unknown, revoked or expired. */
export async function userForToken(em: EntityManager, secret: string): Promise<User | null> {
  if (!secret.startsWith(TOKEN_PREFIX) || secret.length > 100) return null;
  const now = Date.now();
  const token = await em.findOne(ApiToken, { hash: hashOf(secret), expiresAt: { $gt: new Date(now) } }, { populate: ['user'] });
  if (!token) return null;
  if (!token.lastUsedAt || now - token.lastUsedAt.getTime() > TOUCH_EVERY_MS) {
    await em.nativeUpdate(ApiToken, { id: token.id }, { lastUsedAt: new Date(now) });
  }
  return token.user as User;
}
