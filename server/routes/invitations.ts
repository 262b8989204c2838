import { invitationCreateBodySchema, invitationParamsSchema, invitationTokenParamsSchema } from '@contracts/api';
import { parseOr422 } from '../services/errors';
import { currentUser, projectAccess } from '../http/access';
import type { RouteModule } from './context';

export const invitationRoutes: RouteModule = (router, { services, access }) => {
  router.get('/projects/:projectId/invitations', access.requireCapability('members.read'), async (_req, res) => {
    res.json({ invitations: await services.invitations.list(projectAccess(res).projectId) });
  });

  router.post('/projects/:projectId/invitations', access.requireCapability('members.invite'), async (req, res) => {
    const body = parseOr422(invitationCreateBodySchema, req.body, 'invitation form');
    res.status(201).json(await services.invitations.create(projectAccess(res).projectId, body, currentUser(req).id));
  });

  router.delete('/projects/:projectId/invitations/:invitationId', access.requireCapability('members.invite'), async (req, res) => {
    const { projectId, invitationId } = parseOr422(invitationParamsSchema, req.params, 'address');
    await services.invitations.revoke(projectId, invitationId, currentUser(req).id);
    res.status(204).end();
  });

  // Preview needs no sign-in: the invitee sees what they were invited to before signing in or up.
  router.get('/invitations/:token', async (req, res) => {
    const { token } = parseOr422(invitationTokenParamsSchema, req.params, 'address');
    res.json(await services.invitations.preview(token));
  });

  router.post('/invitations/:token/accept', access.requireUser, async (req, res) => {
    const { token } = parseOr422(invitationTokenParamsSchema, req.params, 'address');
    const user = currentUser(req);
    res.json({ project: await services.invitations.accept(token, user) });
  });
};
