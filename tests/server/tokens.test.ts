/** Link tokens: random, URL-safe, stored only as SHA-256. */
import { describe, expect, it } from 'vitest';
import { hashToken, newToken } from '../../server/services/tokens';
import { invitationTokenParamsSchema, resetConfirmBodySchema } from '@contracts/api';

describe('link tokens', () => {
  it('hashes with SHA-256 (FIPS 180-2 test vector for "abc")', () => {
    expect(hashToken('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('makes 256-bit base64url tokens that the contracts accept, all different', () => {
    const seen = new Set<string>();
    for (let i = 0; i < 200; i++) {
      const { token, hash } = newToken();
      // 32 bytes → ceil(32·8/6) = 43 base64url characters without padding (RFC 4648 §5)
      expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
      expect(hash).toBe(hashToken(token));
      expect(invitationTokenParamsSchema.safeParse({ token }).success).toBe(true);
      expect(resetConfirmBodySchema.safeParse({ token, password: 'long-enough-password' }).success).toBe(true);
      seen.add(token);
    }
    expect(seen.size).toBe(200);
  });
});
