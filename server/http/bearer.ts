/**
 * `Authorization: Bearer <personal API token>` (issue 10, "Scripted use").
 *
 * A request with a Bearer header acts as the token's owner, whatever session cookie it carries: the
 * same `req.user` a session would give, so every role check is the session's. A bad token is a 401 at
 * once (never a silent fall-back to the session). The CSRF check exists because browsers attach cookies
 * on their own; a Bearer header is never attached by a browser, so a Bearer request that carries no
 * cookie skips it. One that also carries a cookie is checked as usual.
 */
import type { Request, RequestHandler } from 'express';
import type { Services } from '../services';
import { sendError } from './errors';
import './types';

const BEARER = /^Bearer\s+(\S+)\s*$/i;

declare module 'express-serve-static-core' {
  interface Request {
    /** set when the request was authenticated by a personal API token */
    viaToken?: boolean;
  }
}

export function bearerAuth(services: Services): RequestHandler {
  return (req, res, next) => {
    const header = req.headers.authorization;
    if (header === undefined) return next();
    const m = BEARER.exec(header);
    if (!m) {
      sendError(res, 'unauthenticated', 'The Authorization header must read "Bearer <token>".');
      return;
    }
    services.apiTokens.authenticate(m[1]!).then((user) => {
      if (!user) {
        sendError(res, 'unauthenticated', 'This API token is not valid: it is unknown or was revoked. Create a new one in your account settings.');
        return;
      }
      req.user = user;
      req.viaToken = true;
      next();
    }, next);
  };
}

/** CSRF protection, skipped only for Bearer requests that carry no cookie at all. */
export function csrfUnlessBearer(csrf: RequestHandler): RequestHandler {
  return (req: Request, res, next) => {
    if (req.viaToken && !req.headers.cookie) return next();
    return csrf(req, res, next);
  };
}
