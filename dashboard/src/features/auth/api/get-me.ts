import { queryOptions, useQuery } from '@tanstack/react-query';
import type { UnitSystem } from '@wellkept/core';
import { request } from '../../../lib/api-client';

export type Role = 'admin' | 'technician' | 'owner';

/** GET /api/auth/me */
export interface Me {
  user: {
    id: string;
    email: string;
    name: string;
    role: Role;
    unitSystem: UnitSystem;
    timeZone: string;
  };
  company: { id: string; name: string };
  siteIds: string[];
}

export function getMe(): Promise<Me> {
  return request<Me>('/auth/me');
}

export const meQueryOptions = () =>
  queryOptions({ queryKey: ['auth', 'me'] as const, queryFn: getMe, staleTime: 5 * 60_000 });

export function useMe() {
  return useQuery(meQueryOptions());
}
