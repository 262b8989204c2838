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

export const routeModules: RouteModule[] = [
  healthRoutes,
  authRoutes,
  accountRoutes,
  apiTokenRoutes,
  projectRoutes,
  memberRoutes,
  invitationRoutes,
  designRoutes,
  jobRoutes,
  auditRoutes,
  adminRoutes,
];
