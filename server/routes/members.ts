import type { Request } from 'express';
import { memberParamsSchema, memberUpdateBodySchema } from '@contracts/api';
import { parseOr422 } from '../services/errors';
import { currentUser, projectAccess } from '../http/access';
import type { RouteModule } from './context';

/** Removing yourself is leaving, which every member may do; removing someone else needs members.remove. */
const removeCapability = (req: Request) => (req.user && String(req.user.id) === String(req.params.userId) ? 'project.read' : 'members.remove');

export const memberRoutes: RouteModule = (router, { services, access }) => {
  router.get('/projects/:projectId/members', access.requireCapability('members.read'), async (_req, res) => {
    res.json({ members: await services.members.list(projectAccess(res).projectId) });
  });

  router.patch('/projects/:projectId/members/:userId', access.requireCapability('members.changeRole'), async (req, res) => {
    const { projectId, userId } = parseOr422(memberParamsSchema, req.params, 'address');
    const body = parseOr422(memberUpdateBodySchema, req.body, 'role form');
    res.json(await services.members.changeRole(projectId, userId, body.role, body.version, currentUser(req).id));
  });

  router.delete('/projects/:projectId/members/:userId', access.requireCapability(removeCapability), async (req, res) => {
    const { projectId, userId } = parseOr422(memberParamsSchema, req.params, 'address');
    await services.members.remove(projectId, userId, currentUser(req).id);
    res.status(204).end();
  });
};
