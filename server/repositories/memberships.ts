import type { ProjectRole } from '@contracts/roles';
import type { Db } from './db';

export interface MemberRecord {
  userId: number;
  email: string;
  displayName: string;
  role: ProjectRole;
  version: number;
}

interface MemberRow {
  user_id: number;
  email: string;
  display_name: string;
  role: ProjectRole;
  version: number;
}

const toMember = (r: MemberRow): MemberRecord => ({
  userId: r.user_id,
  email: r.email,
  displayName: r.display_name,
  role: r.role,
  version: r.version,
});

export function membershipsRepo(db: Db) {
  const members = () =>
    db<MemberRow>('memberships as m')
      .join('users as u', 'u.id', 'm.user_id')
      .select('m.user_id', 'u.email', 'u.display_name', 'm.role', 'm.version');
  return {
    async roleOf(projectId: number, userId: number): Promise<ProjectRole | null> {
      const r = await db('memberships').where({ project_id: projectId, user_id: userId }).first('role');
      return (r?.role as ProjectRole | undefined) ?? null;
    },
    async list(projectId: number): Promise<MemberRecord[]> {
      const rows = await members().where('m.project_id', projectId).orderBy([{ column: 'u.display_name' }, { column: 'm.user_id' }]);
      return rows.map(toMember);
    },
    async find(projectId: number, userId: number): Promise<MemberRecord | null> {
      const r = await members().where('m.project_id', projectId).andWhere('m.user_id', userId).first();
      return r ? toMember(r) : null;
    },
    /** false when the user is already a member */
    async insert(projectId: number, userId: number, role: ProjectRole): Promise<boolean> {
      const rows = await db('memberships')
        .insert({ project_id: projectId, user_id: userId, role })
        .onConflict(['project_id', 'user_id'])
        .ignore()
        .returning('id');
      return rows.length > 0;
    },
    /**
     * Lock the project's owner rows until the transaction ends and return their user ids.
     * Two owners demoting each other at once are serialised here, so one of them always stays.
     */
    async lockOwners(projectId: number): Promise<number[]> {
      const rows = await db('memberships').where({ project_id: projectId, role: 'owner' }).forUpdate().select('user_id').orderBy('user_id');
      return rows.map((r: { user_id: number }) => r.user_id);
    },
    /** null when `version` is stale or the membership is gone */
    async updateRole(projectId: number, userId: number, role: ProjectRole, version: number): Promise<{ role: ProjectRole; version: number } | null> {
      const [r] = await db('memberships')
        .where({ project_id: projectId, user_id: userId, version })
        .update({ role, version: db.raw('version + 1') })
        .returning(['role', 'version']);
      return (r as { role: ProjectRole; version: number } | undefined) ?? null;
    },
    async delete(projectId: number, userId: number): Promise<boolean> {
      return (await db('memberships').where({ project_id: projectId, user_id: userId }).delete()) > 0;
    },
  };
}
export type MembershipsRepo = ReturnType<typeof membershipsRepo>;
