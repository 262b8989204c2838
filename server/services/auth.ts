/**
 * Accounts: sign-up with e-mail confirmation, credential checks, password reset and change.
 *
 * Nothing here tells a caller whether an address has an account (OWASP Authentication cheat
 * sheet, "account enumeration"):
 * - sign-up gives one answer for a new and for a known address, after the same work (one
 *   bcrypt hash, one short transaction); the difference only shows in the e-mail, which
 *   reaches the owner of the address alone: a confirmation link for a new account, a
 *   "someone tried to sign up with your address" note for an existing one;
 * - sign-in failures say the same thing whether the account is unknown, the password wrong
 *   or the address not yet confirmed, and take about the same time: an unknown e-mail is
 *   still checked against a dummy bcrypt hash.
 *
 * An unconfirmed account is refused at sign-in with that same generic text (rather than a
 * distinct "confirm your address first" answer): simplest, and it leaks nothing; the text
 * itself reminds people who have just signed up to open the link.
 */
import { randomBytes } from 'node:crypto';
import type { User } from '@contracts/api';
import { usersRepo, type UserRecord } from '../repositories/users';
import { passwordResetsRepo } from '../repositories/passwordResets';
import { emailVerificationsRepo } from '../repositories/emailVerifications';
import { sessionsRepo } from '../repositories/sessions';
import { AppError, staleWrite, unauthenticated } from './errors';
import { recordAudit } from './audit';
import { hashToken, newToken } from './tokens';
import { emailVerificationMail, passwordResetMail, signUpAttemptMail } from '../mail/templates';
import type { OutgoingMail } from '../mail/mailer';
import type { ServiceDeps } from './context';
import type { PasswordHasher } from '../workers/passwordHash';

export const SIGN_IN_FAILED =
  'The e-mail address or password is not right. If you have just created the account, open the confirmation link we e-mailed you first.';

export const VERIFY_LINK_FAILED = 'This confirmation link is not valid any more.';

export function toPublicUser(u: UserRecord): User {
  return { id: u.id, email: u.email, displayName: u.displayName, siteRole: u.siteRole, version: u.version };
}

/** `passwords`: bcrypt at the configured cost, in a worker thread (server/workers/passwordHash.ts) */
export function authService(deps: ServiceDeps, passwords: PasswordHasher) {
  const { db, config } = deps;
  // Computed once: a real bcrypt hash of a random string, compared against when the e-mail
  // is unknown so both failure paths cost one bcrypt comparison.
  let dummyHash: Promise<string> | null = null;
  const getDummyHash = () => {
    if (!dummyHash) {
      const made = passwords.hash(randomBytes(16).toString('hex'));
      // a failure (the worker could not start) is tried again at the next sign-in
      made.catch(() => {
        if (dummyHash === made) dummyHash = null;
      });
      dummyHash = made;
    }
    return dummyHash;
  };

  return {
    hashPassword(password: string): Promise<string> {
      return passwords.hash(password);
    },

    /**
     * Records a sign-up and returns the one e-mail to send (after answering, so the answer's
     * timing does not depend on the SMTP server). The caller answers the same in every case.
     *
     * - new address: an unconfirmed account and a confirmation link;
     * - address of an unconfirmed account: nothing about the account changes (its first password and name
     *   stay, earlier links keep working) and one more link goes out (people lose mails). A later sign-up
     *   must not replace the password: whoever signed up second would otherwise take over the account the
     *   moment the owner of the mailbox opens any link (issue 8, item 2). Links set only "confirmed";
     * - address of a confirmed account: nothing changes; its owner is told someone tried.
     */
    async signUp(input: { email: string; password: string; displayName: string }): Promise<OutgoingMail> {
      // hashed in every case, so a known address costs the same time as a new one
      const passwordHash = await passwords.hash(input.password);
      const now = deps.now();
      return db.transaction(async (trx) => {
        const users = usersRepo(trx);
        const created = await users.insert({ email: input.email, passwordHash, displayName: input.displayName, siteRole: 'member', emailVerifiedAt: null });
        const user = created ?? (await users.findByEmailForUpdate(input.email));
        if (!user) throw new Error('sign-up: the address is taken but its account cannot be read');

        if (!created && user.emailVerifiedAt) {
          await recordAudit(trx, { projectId: null, actorId: null, action: 'auth.sign_up_existing', detail: { userId: user.id } });
          return {
            to: user.email,
            ...signUpAttemptMail({ signInLink: `${config.publicUrl}/sign-in`, resetLink: `${config.publicUrl}/reset`, displayName: user.displayName }),
          };
        }

        const verifications = emailVerificationsRepo(trx);
        const { token, hash } = newToken();
        const expiresAt = new Date(now.getTime() + config.emailVerificationTtlMs);
        await verifications.insert({ userId: user.id, tokenHash: hash, expiresAt });
        await recordAudit(trx, { projectId: null, actorId: user.id, action: 'auth.sign_up', detail: created ? {} : { repeated: true } });
        return {
          to: user.email,
          ...emailVerificationMail({
            link: `${config.publicUrl}/verify/${token}`,
            displayName: user.displayName,
            expiresAt,
            repeatOf: created ? undefined : { resetLink: `${config.publicUrl}/reset` },
          }),
        };
      });
    },

    /** Sends a mail from signUp; failures are logged (the answer went out already). */
    async deliver(mail: OutgoingMail): Promise<void> {
      await deps.mailer.send(mail);
    },

    /** Confirms the address behind a link token: the user to sign in, or a 422 for a bad, used or expired link. */
    async verifyEmail(token: string): Promise<User> {
      return db.transaction(async (trx) => {
        const now = deps.now();
        const verifications = emailVerificationsRepo(trx);
        const found = await verifications.findUsable(hashToken(token), now);
        if (!found) {
          throw new AppError('unprocessable', VERIFY_LINK_FAILED, [
            { path: ['token'], message: 'The link has expired or was already used. Sign up again with the same address to get a new one, or sign in.' },
          ]);
        }
        await usersRepo(trx).markEmailVerified(found.userId, now);
        await verifications.spendAllForUser(found.userId, now);
        await recordAudit(trx, { projectId: null, actorId: found.userId, action: 'auth.email_verify', detail: {} });
        const user = await usersRepo(trx).findById(found.userId);
        if (!user) throw new Error('verify: the account vanished');
        return toPublicUser(user);
      });
    },

    /** the user when e-mail and password match, otherwise null (never says which part was wrong) */
    async verifyCredentials(email: string, password: string): Promise<User | null> {
      const user = await usersRepo(db).findByEmail(email);
      if (!user) {
        await passwords.compare(password, await getDummyHash());
        return null;
      }
      const matches = await passwords.compare(password, user.passwordHash);
      // an unconfirmed account gets the same refusal as a wrong password (see the header comment)
      return matches && user.emailVerifiedAt ? toPublicUser(user) : null;
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
      const passwordHash = await passwords.hash(password);
      await db.transaction(async (trx) => {
        const now = deps.now();
        const reset = await passwordResetsRepo(trx).findUsable(hashToken(token), now);
        if (!reset) {
          throw new AppError('unprocessable', 'This reset link is not valid any more.', [
            { path: ['token'], message: 'The link has expired or was already used. Ask for a new one.' },
          ]);
        }
        await usersRepo(trx).updatePasswordHash(reset.userId, passwordHash);
        // the reset link came through the mailbox: that confirms the address too
        await usersRepo(trx).markEmailVerified(reset.userId, now);
        await passwordResetsRepo(trx).spendAllForUser(reset.userId, now);
        // whoever held the old password is signed out everywhere
        await sessionsRepo(trx).deleteForUser(reset.userId);
        await recordAudit(trx, { projectId: null, actorId: reset.userId, action: 'account.password_reset', detail: {} });
      });
    },

    async changePassword(userId: number, currentPassword: string, newPassword: string, keepSid: string): Promise<void> {
      const user = await usersRepo(db).findById(userId);
      if (!user) throw unauthenticated();
      if (!(await passwords.compare(currentPassword, user.passwordHash))) {
        throw new AppError('unprocessable', 'The current password is not right.', [{ path: ['currentPassword'], message: 'This is not your current password.' }]);
      }
      const passwordHash = await passwords.hash(newPassword);
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
