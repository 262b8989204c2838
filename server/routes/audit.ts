import { auditQuerySchema } from '@contracts/api';
import { parseOr422 } from '../services/errors';
import { projectAccess } from '../http/access';
import type { RouteModule } from './context';

export const auditRoutes: RouteModule = (router, { services, access }) => {
  router.get('/projects/:projectId/audit', access.requireCapability('audit.read'), async (req, res) => {
    const q = parseOr422(auditQuerySchema, req.query, 'query');
    res.json({ entries: await services.audit.list(projectAccess(res).projectId, q.limit, q.before) });
  });
};
