import type { Db } from './db';

/**
 * The session rows written by connect-pg-simple. Only used to end a user's other sessions
 * after a password change or reset.
 */
export function sessionsRepo(db: Db) {
  return {
    /** delete every session signed in as `userId`, except `keepSid` */
    async deleteForUser(userId: number, keepSid?: string): Promise<number> {
      const q = db('sessions').whereRaw(`(sess -> 'passport' ->> 'user') = ?`, [String(userId)]);
      if (keepSid) q.whereNot({ sid: keepSid });
      return q.delete();
    },
  };
}
