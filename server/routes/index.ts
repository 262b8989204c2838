/** Every API route module, in mounting order. */
import type { RouteModule } from './context';
import { healthRoutes } from './health';
import { authRoutes } from './auth';
import { accountRoutes, apiTokenRoutes } from './account';
import { projectRoutes } from './projects';
import { memberRoutes } from './members';
import { invitationRoutes } from './invitations';
import { designRoutes } from './designs';
import { auditRoutes } from './audit';
import { adminRoutes } from './admin';
import { jobRoutes } from './jobs';

// Express tries the routes in this order, one path match each, until one fits: the jobs module (whose two lists the
// studio polls while jobs run) comes right after health, so those reads skip some thirty matches. No route here
// shares a path with another module's and none is a catch-all, so the order decides nothing else.
export const routeModules: RouteModule[] = [
  healthRoutes,
  jobRoutes,
  authRoutes,
  accountRoutes,
  apiTokenRoutes,
  projectRoutes,
  memberRoutes,
  invitationRoutes,
  designRoutes,
  auditRoutes,
  adminRoutes,
];
