/**
 * Accounts: sign-up, credential checks, password reset and password change.
 *
 * Sign-in failures say the same thing whether or not the account exists, and take about
 * the same time: an unknown e-mail is still checked against a dummy bcrypt hash.
 */
import bcrypt from 'bcryptjs';
import { randomBytes } from 'node:crypto';
import type { User } from '@contracts/api';
import { usersRepo, type UserRecord } from '../repositories/users';
import { passwordResetsRepo } from '../repositories/passwordResets';
import { sessionsRepo } from '../repositories/sessions';
import { AppError, conflict, staleWrite, unauthenticated } from './errors';
import { recordAudit } from './audit';
import { hashToken, newToken } from './tokens';
import { passwordResetMail } from '../mail/templates';
import type { ServiceDeps } from './context';

export const SIGN_IN_FAILED = 'The e-mail address or password is not right.';

export function toPublicUser(u: UserRecord): User {
  return { id: u.id, email: u.email, displayName: u.displayName, siteRole: u.siteRole, version: u.version };
}

export function authService(deps: ServiceDeps) {
  const { db, config } = deps;
  // Computed once: a real bcrypt hash of a random string, compared against when the e-mail
  // is unknown so both failure paths cost one bcrypt comparison.
  let dummyHash: Promise<string> | null = null;
  const getDummyHash = () => (dummyHash ??= bcrypt.hash(randomBytes(16).toString('hex'), config.bcryptRounds));

  return {
    hashPassword(password: string): Promise<string> {
      return bcrypt.hash(password, config.bcryptRounds);
    },

    async signUp(input: { email: string; password: string; displayName: string }): Promise<User> {
      const passwordHash = await bcrypt.hash(input.password, config.bcryptRounds);
      return db.transaction(async (trx) => {
        const user = await usersRepo(trx).insert({ email: input.email, passwordHash, displayName: input.displayName, siteRole: 'member' });
        if (!user) {
          throw conflict('An account cannot be created with this e-mail address. If it is yours, sign in or reset the password.');
        }
        await recordAudit(trx, { projectId: null, actorId: user.id, action: 'auth.sign_up', detail: {} });
        return toPublicUser(user);
      });
    },

    /** the user when e-mail and password match, otherwise null (never says which part was wrong) */
    async verifyCredentials(email: string, password: string): Promise<User | null> {
      const user = await usersRepo(db).findByEmail(email);
      if (!user) {
        await bcrypt.compare(password, await getDummyHash());
        return null;
      }
      return (await bcrypt.compare(password, user.passwordHash)) ? toPublicUser(user) : null;
    },

    async recordSignIn(userId: number): Promise<void> {
      await recordAudit(db, { projectId: null, actorId: userId, action: 'auth.sign_in', detail: {} });
    },

    async getUser(id: number): Promise<User | null> {
      const u = await usersRepo(db).findById(id);
      return u ? toPublicUser(u) : null;
    },

    /**
     * Sends a reset link when the account exists; does nothing visible otherwise, so the
     * answer cannot be used to find out which addresses have accounts.
     */
    async requestPasswordReset(email: string): Promise<void> {
      const user = await usersRepo(db).findByEmail(email);
      if (!user) return;
      const { token, hash } = newToken();
      const expiresAt = new Date(deps.now().getTime() + config.passwordResetTtlMs);
      await passwordResetsRepo(db).insert({ userId: user.id, tokenHash: hash, expiresAt });
      const link = `${config.publicUrl}/reset/${token}`;
      await deps.mailer.send({ to: user.email, ...passwordResetMail({ link, displayName: user.displayName, expiresAt }) });
    },

    async confirmPasswordReset(token: string, password: string): Promise<void> {
      const passwordHash = await bcrypt.hash(password, config.bcryptRounds);
      await db.transaction(async (trx) => {
        const now = deps.now();
        const reset = await passwordResetsRepo(trx).findUsable(hashToken(token), now);
        if (!reset) {
          throw new AppError('unprocessable', 'This reset link is not valid any more.', [
            { path: ['token'], message: 'The link has expired or was already used. Ask for a new one.' },
          ]);
        }
        await usersRepo(trx).updatePasswordHash(reset.userId, passwordHash);
        await passwordResetsRepo(trx).spendAllForUser(reset.userId, now);
        // whoever held the old password is signed out everywhere
        await sessionsRepo(trx).deleteForUser(reset.userId);
        await recordAudit(trx, { projectId: null, actorId: reset.userId, action: 'account.password_reset', detail: {} });
      });
    },

    async changePassword(userId: number, currentPassword: string, newPassword: string, keepSid: string): Promise<void> {
      const user = await usersRepo(db).findById(userId);
      if (!user) throw unauthenticated();
      if (!(await bcrypt.compare(currentPassword, user.passwordHash))) {
        throw new AppError('unprocessable', 'The current password is not right.', [{ path: ['currentPassword'], message: 'This is not your current password.' }]);
      }
      const passwordHash = await bcrypt.hash(newPassword, config.bcryptRounds);
      await db.transaction(async (trx) => {
        await usersRepo(trx).updatePasswordHash(userId, passwordHash);
        // other browsers signed in with the old password are signed out; this one stays
        await sessionsRepo(trx).deleteForUser(userId, keepSid);
        await recordAudit(trx, { projectId: null, actorId: userId, action: 'account.password_change', detail: {} });
      });
    },

    async updateDisplayName(userId: number, displayName: string, version: number): Promise<User> {
      const users = usersRepo(db);
      const updated = await users.updateDisplayName(userId, displayName, version);
      if (updated) return toPublicUser(updated);
      if (!(await users.findById(userId))) throw unauthenticated();
      throw staleWrite('Your account');
    },
  };
}
export type AuthService = ReturnType<typeof authService>;
