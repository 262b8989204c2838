import type { SiteRole } from '@contracts/roles';
import { type Db, iso, isUniqueViolation } from './db';

export interface UserRecord {
  id: number;
  email: string;
  displayName: string;
  siteRole: SiteRole;
  version: number;
  passwordHash: string;
  createdAt: string;
}

interface UserRow {
  id: number;
  email: string;
  display_name: string;
  site_role: SiteRole;
  version: number;
  password_hash: string;
  created_at: Date;
}

const toUser = (r: UserRow): UserRecord => ({
  id: r.id,
  email: r.email,
  displayName: r.display_name,
  siteRole: r.site_role,
  version: r.version,
  passwordHash: r.password_hash,
  createdAt: iso(r.created_at),
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
    /** null when the e-mail address is already taken */
    async insert(u: { email: string; passwordHash: string; displayName: string; siteRole: SiteRole }): Promise<UserRecord | null> {
      try {
        const [r] = await db<UserRow>('users')
          .insert({ email: u.email, password_hash: u.passwordHash, display_name: u.displayName, site_role: u.siteRole })
          .returning('*');
        return toUser(r as UserRow);
      } catch (err) {
        if (isUniqueViolation(err)) return null;
        throw err;
      }
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
