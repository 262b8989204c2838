/**
 * Projects and membership-based access. A user sees a project only through a membership;
 * to anyone else it does not exist (404, so ids cannot be probed).
 */
import type { Project } from '@contracts/api';
import { can, roleCapabilities, type Capability, type ProjectRole } from '@contracts/roles';
import { projectsRepo, type ProjectWithRole } from '../repositories/projects';
import { membershipsRepo } from '../repositories/memberships';
import { forbidden, notFound, staleWrite } from './errors';
import { recordAudit } from './audit';
import type { ServiceDeps } from './context';
import type { DesignService } from './designs';

export function toPublicProject(p: ProjectWithRole): Project {
  return {
    id: p.id,
    name: p.name,
    description: p.description,
    role: p.role,
    capabilities: [...roleCapabilities[p.role]],
    version: p.version,
    createdAt: p.createdAt,
    updatedAt: p.updatedAt,
  };
}

/**
 * The role table applied to a role read from the database: 404 when there is none (not a member, so the project
 * does not exist for the caller), 403 when the role lacks `capability`. The one place both `authorize` and the
 * reads that fetch the role together with their rows (jobs and revisions lists) decide access.
 */
export function requireRole(role: ProjectRole | null, capability: Capability): ProjectRole {
  if (!role) throw notFound('The project');
  if (!can(role, capability)) throw forbidden();
  return role;
}

export function projectService(deps: ServiceDeps, designs: DesignService) {
  const { db } = deps;
  const service = {
    /** the caller's role in the project; throws 404 when not a member */
    async roleOf(projectId: number, userId: number): Promise<ProjectRole> {
      const role = await membershipsRepo(db).roleOf(projectId, userId);
      if (!role) throw notFound('The project');
      return role;
    },

    /** throws 404 (not a member) or 403 (role lacks the capability); returns the role */
    async authorize(projectId: number, userId: number, capability: Capability): Promise<ProjectRole> {
      return requireRole(await membershipsRepo(db).roleOf(projectId, userId), capability);
    },

    async list(userId: number): Promise<Project[]> {
      return (await projectsRepo(db).listForUser(userId)).map(toPublicProject);
    },

    async get(projectId: number, userId: number): Promise<Project> {
      const p = await projectsRepo(db).findForUser(projectId, userId);
      if (!p) throw notFound('The project');
      return toPublicProject(p);
    },

    async create(input: { name: string; description: string }, userId: number): Promise<Project> {
      const id = await db.transaction(async (trx) => {
        const p = await projectsRepo(trx).insert({ ...input, createdBy: userId });
        await membershipsRepo(trx).insert(p.id, userId, 'owner');
        await designs.createFor(trx, p.id, input.name, userId);
        await recordAudit(trx, { projectId: p.id, actorId: userId, action: 'project.create', detail: { name: p.name } });
        return p.id;
      });
      return service.get(id, userId);
    },

    async update(projectId: number, patch: { name?: string; description?: string }, version: number, userId: number): Promise<Project> {
      await db.transaction(async (trx) => {
        const before = await projectsRepo(trx).findById(projectId);
        if (!before) throw notFound('The project');
        const after = await projectsRepo(trx).update(projectId, patch, version);
        if (!after) throw staleWrite('The project');
        const changed: Record<string, { from: string; to: string }> = {};
        if (patch.name !== undefined && patch.name !== before.name) changed.name = { from: before.name, to: after.name };
        if (patch.description !== undefined && patch.description !== before.description) changed.description = { from: before.description, to: after.description };
        await recordAudit(trx, { projectId, actorId: userId, action: 'project.update', detail: { changed, version: after.version } });
      });
      return service.get(projectId, userId);
    },

    async remove(projectId: number, userId: number): Promise<void> {
      await db.transaction(async (trx) => {
        const p = await projectsRepo(trx).findById(projectId);
        if (!p) throw notFound('The project');
        // written first: the row keeps the project's name after project_id is cleared by the delete
        await recordAudit(trx, { projectId, actorId: userId, action: 'project.delete', detail: { projectId, name: p.name } });
        await projectsRepo(trx).delete(projectId);
      });
    },
  };
  return service;
}
export type ProjectService = ReturnType<typeof projectService>;
