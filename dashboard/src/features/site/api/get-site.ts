import { queryOptions, useQuery } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

/** GET /api/sites/:siteId */
export interface Site {
  id: string;
  name: string;
  locality: string;
  latitude: number;
  longitude: number;
  elevationM: number;
  timeZone: string;
  notes: string;
  reportingIntervalS: number;
  createdAt: string;
  updatedAt: string;
}

export function getSite(siteId: string): Promise<Site> {
  return request<Site>(`/sites/${siteId}`);
}

export const siteQueryOptions = (siteId: string) =>
  queryOptions({ queryKey: queryKeys.site(siteId), queryFn: () => getSite(siteId) });

export function useSite(siteId: string) {
  return useQuery(siteQueryOptions(siteId));
}
