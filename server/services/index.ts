/** All services, wired once per app. */
import { ping } from '../repositories/db';
import type { ServiceDeps } from './context';
import { authService } from './auth';
import { projectService } from './projects';
import { memberService } from './members';
import { invitationService } from './invitations';
import { designService } from './designs';
import { auditService } from './audit';
import { adminService } from './admin';
import { jobService, type JobDeps } from './jobs';
import { apiTokenService, notificationService } from './apiTokens';

export function createServices(deps: ServiceDeps, jobDeps: JobDeps) {
  const designs = designService(deps);
  return {
    health: { databaseUp: () => ping(deps.db) },
    auth: authService(deps),
    projects: projectService(deps, designs),
    members: memberService(deps),
    invitations: invitationService(deps),
    designs,
    audit: auditService(deps),
    admin: adminService(deps),
    jobs: jobService(deps, jobDeps),
    apiTokens: apiTokenService(deps),
    notifications: notificationService(deps),
  };
}
export type Services = ReturnType<typeof createServices>;
