import { useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { sessionUserSchema, type LoginRequest, type SessionUser } from '@shared/api/auth';
import { api, setCsrfToken } from '@/lib/api-client';
import { replaceSessionUser } from './get-me';

const loginResponseSchema = z.object({ user: sessionUserSchema, csrfToken: z.string().min(1) });

export async function login(credentials: LoginRequest): Promise<SessionUser> {
  const { user, csrfToken } = await api.post('/api/auth/login', credentials, { schema: loginResponseSchema });
  // Sign-in regenerates the session, so the token fetched before it is void.
  setCsrfToken(csrfToken);
  return user;
}

export function useLogin() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: login,
    // Wrong password and lock-out are 401/423 answers for the form, not an ended session.
    meta: { handlesUnauthorized: true },
    onSuccess: (user) => replaceSessionUser(queryClient, user),
  });
}
