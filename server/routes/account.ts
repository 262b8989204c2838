import { accountNotificationsSchema, accountUpdateBodySchema, apiTokenCreateBodySchema, apiTokenParamsSchema, passwordChangeBodySchema } from '@contracts/api';
import { parseOr422 } from '../services/errors';
import { currentUser } from '../http/access';
import type { RouteModule } from './context';

export const accountRoutes: RouteModule = (router, { services, access, limiters }) => {
  router.patch('/account', access.requireUser, async (req, res) => {
    const user = currentUser(req);
    const body = parseOr422(accountUpdateBodySchema, req.body, 'account form');
    res.json({ user: await services.auth.updateDisplayName(user.id, body.displayName, body.version) });
  });

  router.post('/account/password', limiters.passwordChange, access.requireUser, async (req, res) => {
    const user = currentUser(req);
    const body = parseOr422(passwordChangeBodySchema, req.body, 'password form');
    await services.auth.changePassword(user.id, body.currentPassword, body.newPassword, req.sessionID);
    res.json({ ok: true });
  });
};

/** Personal API tokens: the signed-in user's own; `POST` answers the secret once. */
export const apiTokenRoutes: RouteModule = (router, { services, access }) => {
  router.get('/account/tokens', access.requireUser, async (req, res) => {
    res.json({ tokens: await services.apiTokens.list(currentUser(req).id) });
  });
  router.post('/account/tokens', access.requireUser, async (req, res) => {
    const body = parseOr422(apiTokenCreateBodySchema, req.body, 'token form');
    res.status(201).json(await services.apiTokens.create(currentUser(req).id, body.name));
  });
  router.delete('/account/tokens/:tokenId', access.requireUser, async (req, res) => {
    const { tokenId } = parseOr422(apiTokenParamsSchema, req.params, 'address');
    await services.apiTokens.revoke(currentUser(req).id, tokenId);
    res.status(204).end();
  });

  // the job e-mail switch (issue 10): on or off for the signed-in user
  router.get('/account/notifications', access.requireUser, async (req, res) => {
    res.json(await services.notifications.get(currentUser(req).id));
  });
  router.put('/account/notifications', access.requireUser, async (req, res) => {
    const body = parseOr422(accountNotificationsSchema, req.body, 'notification settings');
    res.json(await services.notifications.set(currentUser(req).id, body.jobMail));
  });
};
