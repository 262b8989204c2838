/**
 * Personal API tokens (issue 10, "Scripted use"). A token is 32 random bytes (256 bits; OWASP asks for at
 * least 128 bits of entropy in session identifiers, from memory) written as `twk_` + base64url. Only its
 * SHA-256 is stored, like the link tokens (services/tokens.ts); the secret is shown once, at creation.
 * A request that sends `Authorization: Bearer <secret>` acts as the token's owner, with exactly the
 * projects and roles that user has.
 */
import { randomBytes } from 'node:crypto';
import type { ApiToken, User } from '@contracts/api';
import { apiTokensRepo, type ApiTokenRecord } from '../repositories/apiTokens';
import { usersRepo } from '../repositories/users';
import type { ServiceDeps } from './context';
import { notFound } from './errors';
import { hashToken } from './tokens';
import { toPublicUser } from './auth';

export const TOKEN_MARK = 'twk_';
/** characters of the secret kept in clear to tell tokens apart: the mark and 6 random characters (36 bits) */
const PREFIX_LENGTH = TOKEN_MARK.length + 6;

const toApi = (t: ApiTokenRecord): ApiToken => ({ id: t.id, name: t.name, prefix: t.prefix, createdAt: t.createdAt, lastUsedAt: t.lastUsedAt });

export function apiTokenService(deps: ServiceDeps) {
  const { db, now } = deps;
  return {
    async list(userId: number): Promise<ApiToken[]> {
      return (await apiTokensRepo(db).listActive(userId)).map(toApi);
    },
    async create(userId: number, name: string): Promise<{ token: ApiToken; secret: string }> {
      const secret = TOKEN_MARK + randomBytes(32).toString('base64url');
      const rec = await apiTokensRepo(db).insert({ userId, name, secretHash: hashToken(secret), prefix: secret.slice(0, PREFIX_LENGTH) });
      return { token: toApi(rec), secret };
    },
    async revoke(userId: number, tokenId: number): Promise<void> {
      // another user's token is "not found" too: ids of others' tokens say nothing
      if (!(await apiTokensRepo(db).revoke(userId, tokenId, now()))) throw notFound('The token');
    },
    /** the user a Bearer secret stands for, or null (unknown, revoked, or the account is gone or unconfirmed) */
    async authenticate(secret: string): Promise<User | null> {
      if (!secret.startsWith(TOKEN_MARK)) return null;
      const repo = apiTokensRepo(db);
      const found = await repo.findActiveByHash(hashToken(secret));
      if (!found) return null;
      const user = await usersRepo(db).findById(found.userId);
      if (!user || !user.emailVerifiedAt) return null;
      await repo.touch(found.id, now());
      return toPublicUser(user);
    },
  };
}

/** The signed-in user's notification switches (users.notify_job_mail). */
export function notificationService(deps: ServiceDeps) {
  const { db } = deps;
  return {
    async get(userId: number): Promise<{ jobMail: boolean }> {
      const r = (await db('users').where({ id: userId }).first('notify_job_mail')) as { notify_job_mail: boolean } | undefined;
      if (!r) throw notFound('The account');
      return { jobMail: r.notify_job_mail };
    },
    async set(userId: number, jobMail: boolean): Promise<{ jobMail: boolean }> {
      const n = await db('users').where({ id: userId }).update({ notify_job_mail: jobMail, updated_at: db.fn.now() });
      if (n === 0) throw notFound('The account');
      return { jobMail };
    },
  };
}
