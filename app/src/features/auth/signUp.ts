// POST /api/auth/sign-up. The answer is the same for a new address and for one that already has
// an account ("check your e-mail"); nobody is signed in until the e-mailed link is followed.
import { useMutation } from '@tanstack/react-query';
import type { z } from 'zod';
import { signUpResponseSchema, type signUpBodySchema, type SignUpResponse } from '@contracts/api';
import { api } from '../../lib/api';

export type SignUpBody = z.input<typeof signUpBodySchema>;

export function signUp(body: SignUpBody): Promise<SignUpResponse> {
  return api('/api/auth/sign-up', { method: 'POST', body }, signUpResponseSchema);
}

export function useSignUp() {
  return useMutation({ mutationFn: signUp });
}
