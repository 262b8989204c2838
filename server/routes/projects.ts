import { projectCreateBodySchema, projectUpdateBodySchema } from '@contracts/api';
import { parseOr422 } from '../services/errors';
import { currentUser, projectAccess } from '../http/access';
import type { RouteModule } from './context';

export const projectRoutes: RouteModule = (router, { services, access }) => {
  router.get('/projects', access.requireUser, async (req, res) => {
    res.json({ projects: await services.projects.list(currentUser(req).id) });
  });

  router.post('/projects', access.requireUser, async (req, res) => {
    const body = parseOr422(projectCreateBodySchema, req.body, 'project form');
    res.status(201).json(await services.projects.create(body, currentUser(req).id));
  });

  router.get('/projects/:projectId', access.requireCapability('project.read'), async (req, res) => {
    res.json(await services.projects.get(projectAccess(res).projectId, currentUser(req).id));
  });

  router.patch('/projects/:projectId', access.requireCapability('project.rename'), async (req, res) => {
    const { version, ...patch } = parseOr422(projectUpdateBodySchema, req.body, 'project form');
    res.json(await services.projects.update(projectAccess(res).projectId, patch, version, currentUser(req).id));
  });

  router.delete('/projects/:projectId', access.requireCapability('project.delete'), async (req, res) => {
    await services.projects.remove(projectAccess(res).projectId, currentUser(req).id);
    res.status(204).end();
  });
};
