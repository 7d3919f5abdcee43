import { useMutation } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';

/** POST /api/auth/password-reset: e-mails a link (202 whether or not the address has an account). */
export function requestPasswordReset(email: string): Promise<void> {
  return request<void>('/auth/password-reset', { method: 'POST', body: { email } });
}

export function useRequestPasswordReset() {
  return useMutation({ mutationFn: requestPasswordReset });
}

/** POST /api/auth/password-reset/confirm: sets the new password and ends every session. */
export function confirmPasswordReset(body: { token: string; password: string }): Promise<void> {
  return request<void>('/auth/password-reset/confirm', { method: 'POST', body });
}

export function useConfirmPasswordReset() {
  return useMutation({ mutationFn: confirmPasswordReset });
}
