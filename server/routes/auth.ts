/**
 * Sign-up, e-mail confirmation, sign-in, sign-out, "who am I", password reset, and the CSRF token.
 *
 * Sessions are regenerated at sign-in, at e-mail confirmation (which signs in) and at sign-out
 * (passport ≥ 0.6 does it in req.login / req.logout), which also drops the CSRF token: the
 * client fetches a new one afterwards.
 */
import type { Request } from 'express';
import {
  resetConfirmBodySchema,
  resetRequestBodySchema,
  signInBodySchema,
  signUpBodySchema,
  verifyEmailBodySchema,
  type SignUpResponse,
  type User,
} from '@contracts/api';
import { AppError, parseOr422 } from '../services/errors';
import { SIGN_IN_FAILED } from '../services/auth';
import { currentUser } from '../http/access';
import type { RouteModule } from './context';

function logIn(req: Request, user: User): Promise<void> {
  return new Promise((resolve, reject) => req.login(user, (err) => (err ? reject(err) : resolve())));
}

function logOut(req: Request): Promise<void> {
  return new Promise((resolve, reject) => req.logout((err) => (err ? reject(err) : resolve())));
}

export const authRoutes: RouteModule = (router, deps) => {
  const { services, limiters, generateCsrfToken } = deps;

  router.get('/auth/csrf', async (req, res) => {
    const csrfToken = generateCsrfToken(req);
    // Stored before answering: express-session would otherwise save after the route and still send the 200 when
    // that save fails (database away), handing out a token no session holds. A failed save answers 503 instead.
    await new Promise<void>((resolve, reject) => req.session.save((err) => (err ? reject(err) : resolve())));
    res.json({ csrfToken });
  });

  router.post('/auth/sign-up', limiters.signUp, async (req, res) => {
    const body = parseOr422(signUpBodySchema, req.body, 'sign-up form');
    const mail = await services.auth.signUp(body);
    // One answer whether the address is new or already has an account; the e-mail (a
    // confirmation link, or a note to the owner) goes out after it, so its timing tells nothing.
    const answer: SignUpResponse = { status: 'check-email' };
    res.status(202).json(answer);
    setImmediate(() => {
      services.auth.deliver(mail).catch((err: unknown) => deps.logger.error('sign-up mail failed:', err));
    });
  });

  router.post('/auth/verify', limiters.verifyEmail, async (req, res) => {
    const { token } = parseOr422(verifyEmailBodySchema, req.body, 'confirmation link');
    const user = await services.auth.verifyEmail(token);
    // a new session id, as at sign-in (session fixation)
    await logIn(req, user);
    await services.auth.recordSignIn(user.id);
    res.json({ user });
  });

  router.post('/auth/sign-in', limiters.signIn, async (req, res) => {
    // parsed first so passport-local sees the normalised (trimmed, lower-cased) e-mail
    req.body = parseOr422(signInBodySchema, req.body, 'sign-in form');
    const user = await deps.authenticateLocal(req, res);
    if (!user) throw new AppError('unauthenticated', SIGN_IN_FAILED);
    await logIn(req, user);
    await services.auth.recordSignIn(user.id);
    res.json({ user });
  });

  router.post('/auth/sign-out', async (req, res) => {
    if (req.user) await logOut(req);
    res.status(204).end();
  });

  router.get('/auth/me', (req, res) => {
    res.json({ user: currentUser(req) });
  });

  router.post('/auth/password-reset/request', limiters.passwordReset, (req, res) => {
    const { email } = parseOr422(resetRequestBodySchema, req.body, 'reset form');
    // The work (lookup, token, e-mail) runs after the answer, so neither the answer nor its
    // timing tells whether an account with this address exists.
    setImmediate(() => {
      services.auth.requestPasswordReset(email).catch((err: unknown) => deps.logger.error('password reset request failed:', err));
    });
    res.status(202).json({ ok: true });
  });

  router.post('/auth/password-reset/confirm', limiters.resetConfirm, async (req, res) => {
    const { token, password } = parseOr422(resetConfirmBodySchema, req.body, 'reset form');
    await services.auth.confirmPasswordReset(token, password);
    res.json({ ok: true });
  });
};
