import { useMutation, useQueryClient } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';
import { type Me, meQueryOptions } from './get-me';

export interface SignInBody {
  email: string;
  password: string;
}

/** POST /api/auth/sign-in: sets the session cookies and answers who signed in. */
export function signIn(body: SignInBody): Promise<Me> {
  return request<Me>('/auth/sign-in', { method: 'POST', body });
}

export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signIn,
    onSuccess: (me) => {
      // A different person may have signed in: nothing cached may leak across.
      queryClient.clear();
      queryClient.setQueryData(meQueryOptions().queryKey, me);
    },
  });
}
