import type { RouteModule } from './context';

export const adminRoutes: RouteModule = (router, { services, access }) => {
  router.get('/admin/mail', access.requireSiteCapability('admin.mail.read'), async (_req, res) => {
    res.json({ messages: await services.admin.listCapturedMail() });
  });
};
