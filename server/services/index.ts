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
import type { PasswordHasher } from '../workers/passwordHash';

/**
 * `databaseUp`: the health check's own question to the database (server/db/healthProbe.ts, a connection no other
 * work can take); without it, a `select 1` through the shared pool. `passwords`: bcrypt off the request thread
 * (server/workers/passwordHash.ts); the caller closes it.
 */
export function createServices(deps: ServiceDeps, jobDeps: JobDeps, opts: { databaseUp?: () => Promise<boolean>; passwords: PasswordHasher }) {
  const designs = designService(deps);
  return {
    health: { databaseUp: opts.databaseUp ?? (() => ping(deps.db)) },
    auth: authService(deps, opts.passwords),
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
