import { accountUpdateBodySchema, passwordChangeBodySchema } from '@contracts/api';
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
