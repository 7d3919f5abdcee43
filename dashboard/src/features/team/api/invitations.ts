import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';
import type { Role } from './users';

/** GET /api/invitations (admins), newest first */
export interface Invitation {
  id: string;
  email: string;
  name: string;
  role: Role;
  siteIds: string[];
  status: 'pending' | 'used' | 'revoked' | 'expired';
  expiresAt: string;
  createdAt: string;
}

export interface InviteBody {
  email: string;
  name: string;
  role: Role;
  siteIds: string[];
}

export const invitationsQueryOptions = () =>
  queryOptions({
    queryKey: ['team', 'invitations'] as const,
    queryFn: () => request<Invitation[]>('/invitations'),
  });

export function useInvitations() {
  return useQuery(invitationsQueryOptions());
}

/** POST /api/invitations: e-mails a link to /accept-invitation */
export function useInvite() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: InviteBody) => request<Invitation>('/invitations', { method: 'POST', body }),
    onSuccess: () =>
      queryClient.invalidateQueries({ queryKey: invitationsQueryOptions().queryKey }),
  });
}

/** DELETE /api/invitations/:id */
export function useRevokeInvitation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => request<void>(`/invitations/${id}`, { method: 'DELETE' }),
    onSuccess: () =>
      queryClient.invalidateQueries({ queryKey: invitationsQueryOptions().queryKey }),
  });
}
