import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';
import { type Me, meQueryOptions, type Role } from './get-me';

/** GET /api/auth/invitations/:token (404 unknown, 410 used or expired). */
export interface InvitationPreview {
  email: string;
  name: string;
  role: Role;
  companyName: string;
  expiresAt: string;
}

export function getInvitation(token: string): Promise<InvitationPreview> {
  return request<InvitationPreview>(`/auth/invitations/${encodeURIComponent(token)}`);
}

export const invitationQueryOptions = (token: string) =>
  queryOptions({
    queryKey: ['auth', 'invitation', token] as const,
    queryFn: () => getInvitation(token),
    enabled: token.length >= 20,
  });

export function useInvitation(token: string) {
  return useQuery(invitationQueryOptions(token));
}

export interface AcceptInvitationBody {
  token: string;
  name?: string;
  password: string;
}

/** POST /api/auth/invitations/accept: creates the account and signs in. */
export function acceptInvitation(body: AcceptInvitationBody): Promise<Me> {
  return request<Me>('/auth/invitations/accept', { method: 'POST', body });
}

export function useAcceptInvitation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: acceptInvitation,
    onSuccess: (me) => {
      queryClient.clear();
      queryClient.setQueryData(meQueryOptions().queryKey, me);
    },
  });
}
