/**
 * Link tokens for invitations and password resets: 32 random bytes (256 bits, well above the
 * 128-bit minimum OWASP recommends for session-like secrets; common practice), sent in the
 * e-mail as base64url and stored only as a SHA-256 hash, so a database leak does not leak
 * usable links.
 */
import { createHash, randomBytes } from 'node:crypto';

export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

export function newToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: hashToken(token) };
}
