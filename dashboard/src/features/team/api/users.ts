import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';

export type Role = 'admin' | 'technician' | 'owner';

/** GET /api/users (admins) */
export interface Person {
  id: string;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  lastSignInAt: string | null;
  createdAt: string;
  siteIds: string[];
}

export const usersQueryOptions = () =>
  queryOptions({
    queryKey: ['team', 'users'] as const,
    queryFn: () => request<Person[]>('/users'),
  });

export function useUsers() {
  return useQuery(usersQueryOptions());
}

/** PATCH /api/users/:userId { role?, name?, siteIds? } */
export function useUpdateUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: { userId: string; role?: Role; siteIds?: string[] }) => {
      const { userId, ...body } = input;
      return request<Person>(`/users/${userId}`, { method: 'PATCH', body });
    },
    onSuccess: () => queryClient.invalidateQueries({ queryKey: usersQueryOptions().queryKey }),
  });
}

/** POST /api/users/:userId/deactivate (ends their sessions) */
export function useDeactivateUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (userId: string) =>
      request<void>(`/users/${userId}/deactivate`, { method: 'POST' }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: usersQueryOptions().queryKey }),
  });
}
