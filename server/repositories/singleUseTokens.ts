import type { Db } from './db';

/**
 * Tables of single-use, expiring link tokens stored hashed (password resets, e-mail confirmations):
 * the same columns (user_id, token_hash, expires_at, used_at) and the same three operations.
 */
export function singleUseTokensRepo(db: Db, table: 'password_resets' | 'email_verifications') {
  return {
    async insert(r: { userId: number; tokenHash: string; expiresAt: Date }): Promise<void> {
      await db(table).insert({ user_id: r.userId, token_hash: r.tokenHash, expires_at: r.expiresAt });
    },
    /** the user id behind an unused, unexpired token (row locked until the transaction ends) */
    async findUsable(tokenHash: string, now: Date): Promise<{ id: number; userId: number } | null> {
      const r = await db(table)
        .where({ token_hash: tokenHash })
        .whereNull('used_at')
        .where('expires_at', '>', now)
        .forUpdate()
        .first('id', 'user_id');
      return r ? { id: r.id as number, userId: r.user_id as number } : null;
    },
    /** mark every open token of the user used: a newer link, or the use of one, spends the older ones */
    async spendAllForUser(userId: number, now: Date): Promise<void> {
      await db(table).where({ user_id: userId }).whereNull('used_at').update({ used_at: now });
    },
  };
}
