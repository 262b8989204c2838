import type { ProjectRole } from '@contracts/roles';
import { type Db, iso } from './db';

export interface ProjectRecord {
  id: number;
  name: string;
  description: string;
  version: number;
  createdAt: string;
  updatedAt: string;
}

export interface ProjectWithRole extends ProjectRecord {
  role: ProjectRole;
}

interface ProjectRow {
  id: number;
  name: string;
  description: string;
  version: number;
  created_at: Date;
  updated_at: Date;
  role?: ProjectRole;
}

const toProject = (r: ProjectRow): ProjectRecord => ({
  id: r.id,
  name: r.name,
  description: r.description,
  version: r.version,
  createdAt: iso(r.created_at),
  updatedAt: iso(r.updated_at),
});

export function projectsRepo(db: Db) {
  const withRole = () =>
    db<ProjectRow>('projects as p')
      .join('memberships as m', 'm.project_id', 'p.id')
      .select('p.id', 'p.name', 'p.description', 'p.version', 'p.created_at', 'p.updated_at', 'm.role');
  return {
    async listForUser(userId: number): Promise<ProjectWithRole[]> {
      const rows = await withRole().where('m.user_id', userId).orderBy([{ column: 'p.updated_at', order: 'desc' }, { column: 'p.id', order: 'desc' }]);
      return rows.map((r) => ({ ...toProject(r), role: r.role as ProjectRole }));
    },
    async findForUser(projectId: number, userId: number): Promise<ProjectWithRole | null> {
      const r = await withRole().where('m.user_id', userId).andWhere('p.id', projectId).first();
      return r ? { ...toProject(r), role: r.role as ProjectRole } : null;
    },
    async findById(projectId: number): Promise<ProjectRecord | null> {
      const r = await db<ProjectRow>('projects').where({ id: projectId }).first();
      return r ? toProject(r) : null;
    },
    async insert(p: { name: string; description: string; createdBy: number }): Promise<ProjectRecord> {
      const [r] = await db('projects').insert({ name: p.name, description: p.description, created_by: p.createdBy }).returning('*');
      return toProject(r as ProjectRow);
    },
    /** null when `version` is stale or the project is gone */
    async update(projectId: number, patch: { name?: string; description?: string }, version: number): Promise<ProjectRecord | null> {
      const [r] = await db('projects')
        .where({ id: projectId, version })
        .update({ ...patch, version: db.raw('version + 1'), updated_at: db.fn.now() })
        .returning('*');
      return r ? toProject(r as ProjectRow) : null;
    },
    /** bump updated_at (e.g. after a design save) so project lists sort by recent work */
    async touch(projectId: number): Promise<void> {
      await db('projects').where({ id: projectId }).update({ updated_at: db.fn.now() });
    },
    async delete(projectId: number): Promise<boolean> {
      return (await db('projects').where({ id: projectId }).delete()) > 0;
    },
  };
}
export type ProjectsRepo = ReturnType<typeof projectsRepo>;
