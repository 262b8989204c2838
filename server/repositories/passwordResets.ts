import type { Db } from './db';
import { singleUseTokensRepo } from './singleUseTokens';

/** Tokens of the password-reset links (stored hashed, expiring, single use; one reset spends all earlier links). */
export const passwordResetsRepo = (db: Db) => singleUseTokensRepo(db, 'password_resets');
