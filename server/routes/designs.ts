/**
 * The designs of a project (contract: server/contracts/api.ts, section "designs").
 *
 *   GET    /projects/:projectId/designs                              project.read
 *   POST   /projects/:projectId/designs                              design.edit
 *   GET    /projects/:projectId/designs/:designId                    project.read
 *   PUT    /projects/:projectId/designs/:designId                    design.edit
 *   DELETE /projects/:projectId/designs/:designId                    design.edit
 *   GET    /projects/:projectId/designs/:designId/versions           project.read
 *   GET    /projects/:projectId/designs/:designId/versions/:version  project.read
 */
import {
  designCreateBodySchema,
  designParamsSchema,
  designUpdateBodySchema,
  designVersionParamsSchema,
} from '@contracts/api';
import { parseOr422 } from '../services/errors';
import { currentUser, projectAccess } from '../http/access';
import type { RouteModule } from './context';

export const designRoutes: RouteModule = (router, { services, access }) => {
  const base = '/projects/:projectId/designs';

  router.get(base, access.requireCapability('project.read'), async (_req, res) => {
    res.json({ designs: await services.designs.list(projectAccess(res).projectId) });
  });

  router.post(base, access.requireCapability('design.edit'), async (req, res) => {
    const body = parseOr422(designCreateBodySchema, req.body, 'design form');
    res.status(201).json({ design: await services.designs.create(projectAccess(res).projectId, body, currentUser(req).id) });
  });

  router.get(`${base}/:designId`, access.requireCapability('project.read'), async (req, res) => {
    const { designId } = parseOr422(designParamsSchema, req.params, 'address');
    res.json({ design: await services.designs.get(projectAccess(res).projectId, designId) });
  });

  router.put(`${base}/:designId`, access.requireCapability('design.edit'), async (req, res) => {
    const { designId } = parseOr422(designParamsSchema, req.params, 'address');
    const body = parseOr422(designUpdateBodySchema, req.body, 'design');
    res.json({ design: await services.designs.update(projectAccess(res).projectId, designId, body, currentUser(req).id) });
  });

  router.delete(`${base}/:designId`, access.requireCapability('design.edit'), async (req, res) => {
    const { designId } = parseOr422(designParamsSchema, req.params, 'address');
    await services.designs.remove(projectAccess(res).projectId, designId, currentUser(req).id);
    res.status(204).end();
  });

  router.get(`${base}/:designId/versions`, access.requireCapability('project.read'), async (req, res) => {
    const { designId } = parseOr422(designParamsSchema, req.params, 'address');
    res.json({ versions: await services.designs.versions(projectAccess(res).projectId, designId) });
  });

  router.get(`${base}/:designId/versions/:version`, access.requireCapability('project.read'), async (req, res) => {
    const { designId, version } = parseOr422(designVersionParamsSchema, req.params, 'address');
    res.json({ version: await services.designs.version(projectAccess(res).projectId, designId, version) });
  });
};
