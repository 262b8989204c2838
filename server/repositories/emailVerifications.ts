import type { Db } from './db';
import { singleUseTokensRepo } from './singleUseTokens';

/** Tokens of the e-mail confirmation links sent at sign-up (stored hashed, expiring, single use). */
export const emailVerificationsRepo = (db: Db) => singleUseTokensRepo(db, 'email_verifications');
