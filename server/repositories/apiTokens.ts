import { type Db, iso, isoOrNull } from './db';

export interface ApiTokenRecord {
  id: number;
  userId: number;
  name: string;
  prefix: string;
  createdAt: string;
  lastUsedAt: string | null;
}

interface ApiTokenRow {
  id: number;
  user_id: number;
  name: string;
  prefix: string;
  created_at: Date;
  last_used_at: Date | null;
}

const toToken = (r: ApiTokenRow): ApiTokenRecord => ({
  id: r.id,
  userId: r.user_id,
  name: r.name,
  prefix: r.prefix,
  createdAt: iso(r.created_at),
  lastUsedAt: isoOrNull(r.last_used_at),
});

const COLUMNS = ['id', 'user_id', 'name', 'prefix', 'created_at', 'last_used_at'];

export function apiTokensRepo(db: Db) {
  return {
    async insert(t: { userId: number; name: string; secretHash: string; prefix: string }): Promise<ApiTokenRecord> {
      const [r] = await db('api_tokens')
        .insert({ user_id: t.userId, name: t.name, secret_hash: t.secretHash, prefix: t.prefix })
        .returning(COLUMNS);
      return toToken(r as ApiTokenRow);
    },
    /** the user's tokens that are not revoked, newest first */
    async listActive(userId: number): Promise<ApiTokenRecord[]> {
      const rows = await db('api_tokens').where({ user_id: userId }).whereNull('revoked_at').orderBy('id', 'desc').select(COLUMNS);
      return (rows as ApiTokenRow[]).map(toToken);
    },
    /** marks the token revoked; false when the user has no such active token */
    async revoke(userId: number, tokenId: number, at: Date): Promise<boolean> {
      const n = await db('api_tokens').where({ id: tokenId, user_id: userId }).whereNull('revoked_at').update({ revoked_at: at });
      return n > 0;
    },
    /** the owner of an active token with this secret hash, or null */
    async findActiveByHash(secretHash: string): Promise<{ id: number; userId: number } | null> {
      const r = await db('api_tokens').where({ secret_hash: secretHash }).whereNull('revoked_at').first('id', 'user_id');
      return r ? { id: r.id as number, userId: r.user_id as number } : null;
    },
    /** records a use; writes at most once a minute per token so a busy script does not turn every read into a write */
    async touch(tokenId: number, at: Date): Promise<void> {
      await db('api_tokens')
        .where({ id: tokenId })
        .where((q) => q.whereNull('last_used_at').orWhere('last_used_at', '<', new Date(at.getTime() - 60_000)))
        .update({ last_used_at: at });
    },
  };
}
