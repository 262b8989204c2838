/**
 * Permission middleware. Every project route names ONE capability from the role table in
 * server/contracts/roles.ts; the table alone decides who may pass.
 *
 *   signed out ─► 401   not a member ─► 404   member without the capability ─► 403
 */
import type { Request, RequestHandler, Response } from 'express';
import { projectParamsSchema } from '@contracts/api';
import { canSite, type Capability, type ProjectRole, type SiteCapability } from '@contracts/roles';
import type { User } from '@contracts/api';
import { forbidden, parseOr422, unauthenticated } from '../services/errors';
import type { Services } from '../services';
import './types';

export interface ProjectAccess {
  projectId: number;
  role: ProjectRole;
}

/** The signed-in user, or a 401. */
export function currentUser(req: Request): User {
  if (!req.user) throw unauthenticated();
  return req.user;
}

/** The project access checked by `requireCapability` for this request. */
export function projectAccess(res: Response): ProjectAccess {
  const access = res.locals.projectAccess as ProjectAccess | undefined;
  if (!access) throw new Error('route reads project access without requireCapability in front of it');
  return access;
}

/** what `checkCapabilityInService` left for the service to check */
export interface DeferredAccess {
  projectId: number;
  userId: number;
  capability: Capability;
}

/** The access check `checkCapabilityInService` left to the service for this request. */
export function deferredAccess(res: Response): DeferredAccess {
  const access = res.locals.deferredAccess as DeferredAccess | undefined;
  if (!access) throw new Error('route reads deferred access without checkCapabilityInService in front of it');
  return access;
}

export function accessControl(services: Services) {
  const requireUser: RequestHandler = (req, _res, next) => {
    currentUser(req);
    next();
  };

  /**
   * Pass when the signed-in user's role in `:projectId` has `capability`.
   * `capability` may be a function of the request for the one route whose rule depends on
   * the target (a member removing themselves is leaving, not removing someone).
   */
  function requireCapability(capability: Capability | ((req: Request) => Capability)): RequestHandler {
    return async (req, res, next) => {
      const user = currentUser(req);
      const { projectId } = parseOr422(projectParamsSchema, { projectId: req.params.projectId }, 'address');
      const cap = typeof capability === 'function' ? capability(req) : capability;
      const role = await services.projects.authorize(projectId, user.id, cap);
      res.locals.projectAccess = { projectId, role } satisfies ProjectAccess;
      next();
    };
  }

  /**
   * For the busiest reads (jobs and revisions lists), whose service reads the caller's role in the same SQL
   * statement as the rows and applies the role table itself (services/projects.ts `requireRole`: the same 404 and
   * 403 as requireCapability). Checks here what needs no database: signed in (401) and a well-formed project id
   * (422). The route reads the capability back with `deferredAccess(res)` and hands it to the service.
   */
  function checkCapabilityInService(capability: Capability): RequestHandler {
    return (req, res, next) => {
      const user = currentUser(req);
      const { projectId } = parseOr422(projectParamsSchema, { projectId: req.params.projectId }, 'address');
      res.locals.deferredAccess = { projectId, userId: user.id, capability } satisfies DeferredAccess;
      next();
    };
  }

  function requireSiteCapability(capability: SiteCapability): RequestHandler {
    return (req, _res, next) => {
      const user = currentUser(req);
      if (!canSite(user.siteRole, capability)) throw forbidden('Only site administrators can see this.');
      next();
    };
  }

  return { requireUser, requireCapability, checkCapabilityInService, requireSiteCapability };
}
export type AccessControl = ReturnType<typeof accessControl>;
