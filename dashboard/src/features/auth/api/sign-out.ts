import { useMutation, useQueryClient } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';

/** POST /api/auth/sign-out: ends the session and clears its cookies. */
export function signOut(): Promise<void> {
  return request<void>('/auth/sign-out', { method: 'POST' });
}

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: signOut, onSettled: () => queryClient.clear() });
}
