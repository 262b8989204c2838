import type { Request, RequestHandler, Response, Router } from 'express';
import type { User } from '@contracts/api';
import type { Services } from '../services';
import type { AccessControl } from '../http/access';
import type { Logger } from '../config';
import type { DesignBodyReader } from '../http/designBody';

/** What route modules receive: services to call and the HTTP-level guards. */
export interface RouteDeps {
  services: Services;
  /** reads a design update body, off the request thread when it is large */
  designBodies: DesignBodyReader;
  access: AccessControl;
  /** run passport-local on the (already parsed) body: the user, or false on bad credentials */
  authenticateLocal: (req: Request, res: Response) => Promise<User | false>;
  /** csrf-sync's token generator (stores the token in the session) */
  generateCsrfToken: (req: Parameters<RequestHandler>[0], overwrite?: boolean) => string;
  limiters: Record<'signIn' | 'signUp' | 'passwordReset' | 'verifyEmail' | 'resetConfirm' | 'passwordChange', RequestHandler>;
  logger: Logger;
}

export type RouteModule = (router: Router, deps: RouteDeps) => void;
