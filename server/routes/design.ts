import { currentUser, projectAccess } from '../http/access';
import type { RouteModule } from './context';

export const designRoutes: RouteModule = (router, { services, access, designBodies }) => {
  router.get('/projects/:projectId/design', access.requireCapability('project.read'), async (_req, res) => {
    res.json(await services.designs.get(projectAccess(res).projectId));
  });

  router.put('/projects/:projectId/design', access.requireCapability('design.edit'), async (req, res) => {
    const body = await designBodies.read(req);
    const saved = await services.designs.putValidated(projectAccess(res).projectId, body, body.version, currentUser(req).id);
    if ('json' in body.document && typeof body.document.json === 'string') {
      // a large document answers with its validated text as is: no object is built or serialised here
      res.type('application/json').send(`{"design":${body.document.json},"version":${saved.version},"updatedAt":${JSON.stringify(saved.updatedAt)}}`);
      return;
    }
    res.json({ design: body.document, ...saved });
  });
};
