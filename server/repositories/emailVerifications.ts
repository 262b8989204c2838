import type { Db } from './db';

/** Tokens of the e-mail confirmation links sent at sign-up (stored hashed, expiring, single use). */
export function emailVerificationsRepo(db: Db) {
  return {
    async insert(r: { userId: number; tokenHash: string; expiresAt: Date }): Promise<void> {
      await db('email_verifications').insert({ user_id: r.userId, token_hash: r.tokenHash, expires_at: r.expiresAt });
    },
    /** the user id behind an unused, unexpired token (row locked until the transaction ends) */
    async findUsable(tokenHash: string, now: Date): Promise<{ id: number; userId: number } | null> {
      const r = await db('email_verifications')
        .where({ token_hash: tokenHash })
        .whereNull('used_at')
        .where('expires_at', '>', now)
        .forUpdate()
        .first('id', 'user_id');
      return r ? { id: r.id as number, userId: r.user_id as number } : null;
    },
    /** mark every open token of the user used: a newer link (or the confirmation itself) spends the older ones */
    async spendAllForUser(userId: number, now: Date): Promise<void> {
      await db('email_verifications').where({ user_id: userId }).whereNull('used_at').update({ used_at: now });
    },
  };
}
