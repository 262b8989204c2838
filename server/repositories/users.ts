import type { SiteRole } from '@contracts/roles';
import { type Db, iso, isoOrNull } from './db';

export interface UserRecord {
  id: number;
  email: string;
  displayName: string;
  siteRole: SiteRole;
  version: number;
  passwordHash: string;
  createdAt: string;
  /** null until the owner of the address followed the confirmation link (such an account cannot sign in) */
  emailVerifiedAt: string | null;
}

interface UserRow {
  id: number;
  email: string;
  display_name: string;
  site_role: SiteRole;
  version: number;
  password_hash: string;
  created_at: Date;
  email_verified_at: Date | null;
}

const toUser = (r: UserRow): UserRecord => ({
  id: r.id,
  email: r.email,
  displayName: r.display_name,
  siteRole: r.site_role,
  version: r.version,
  passwordHash: r.password_hash,
  createdAt: iso(r.created_at),
  emailVerifiedAt: isoOrNull(r.email_verified_at),
});

export function usersRepo(db: Db) {
  return {
    async findById(id: number): Promise<UserRecord | null> {
      const r = await db<UserRow>('users').where({ id }).first();
      return r ? toUser(r) : null;
    },
    async findByEmail(email: string): Promise<UserRecord | null> {
      const r = await db<UserRow>('users').whereRaw('lower(email) = lower(?)', [email]).first();
      return r ? toUser(r) : null;
    },
    /**
     * null when the e-mail address is already taken. ON CONFLICT … DO NOTHING rather than
     * catching the unique violation: an error would abort the caller's transaction.
     */
    async insert(u: { email: string; passwordHash: string; displayName: string; siteRole: SiteRole; emailVerifiedAt: Date | null }): Promise<UserRecord | null> {
      const r = await db.raw<{ rows: UserRow[] }>(
        `INSERT INTO users (email, password_hash, display_name, site_role, email_verified_at)
         VALUES (?, ?, ?, ?, ?)
         ON CONFLICT ((lower(email))) DO NOTHING
         RETURNING *`,
        [u.email, u.passwordHash, u.displayName, u.siteRole, u.emailVerifiedAt],
      );
      const row = r.rows[0];
      return row ? toUser(row) : null;
    },
    /** the row locked until the transaction ends (sign-up decides on it) */
    async findByEmailForUpdate(email: string): Promise<UserRecord | null> {
      const r = await db<UserRow>('users').whereRaw('lower(email) = lower(?)', [email]).forUpdate().first();
      return r ? toUser(r) : null;
    },
    /** marks the address confirmed (no change when it already was) */
    async markEmailVerified(id: number, at: Date): Promise<void> {
      await db('users').where({ id }).whereNull('email_verified_at').update({ email_verified_at: at, updated_at: db.fn.now() });
    },
    /** null when `version` is not the current version (or the user is gone) */
    async updateDisplayName(id: number, displayName: string, version: number): Promise<UserRecord | null> {
      const [r] = await db<UserRow>('users')
        .where({ id, version })
        .update({ display_name: displayName, version: db.raw('version + 1'), updated_at: db.fn.now() } as never)
        .returning('*');
      return r ? toUser(r as UserRow) : null;
    },
    async updatePasswordHash(id: number, passwordHash: string): Promise<void> {
      await db('users').where({ id }).update({ password_hash: passwordHash, updated_at: db.fn.now() });
    },
    async count(): Promise<number> {
      const r = await db('users').count<{ n: string }[]>({ n: '*' });
      return Number(r[0]?.n ?? 0);
    },
  };
}
export type UsersRepo = ReturnType<typeof usersRepo>;
