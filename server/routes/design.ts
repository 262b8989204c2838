import { projectDesignUpdateBodySchema } from '@contracts/api';
import { parseOr422 } from '../services/errors';
import { currentUser, projectAccess } from '../http/access';
import type { RouteModule } from './context';

export const designRoutes: RouteModule = (router, { services, access }) => {
  router.get('/projects/:projectId/design', access.requireCapability('project.read'), async (_req, res) => {
    res.json(await services.designs.get(projectAccess(res).projectId));
  });

  router.put('/projects/:projectId/design', access.requireCapability('design.edit'), async (req, res) => {
    const body = parseOr422(projectDesignUpdateBodySchema, req.body, 'design');
    res.json(await services.designs.put(projectAccess(res).projectId, body.design, body.version, currentUser(req).id));
  });
};
