import { queryOptions, useQuery } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';

/** GET /api/sites/:siteId/gateways/:gatewayId/rejects: what ingest refused, and why. */
export interface Reject {
  id: number;
  receivedAt: string;
  recordName: string | null;
  recordTime: string | null;
  reason: string;
  raw: string | null;
}

export const rejectsQueryOptions = (siteId: string, gatewayId: string) =>
  queryOptions({
    queryKey: ['sites', siteId, 'gateways', gatewayId, 'rejects'] as const,
    queryFn: () =>
      request<Reject[]>(`/sites/${siteId}/gateways/${gatewayId}/rejects`, { query: { limit: 50 } }),
  });

export function useRejects(siteId: string, gatewayId: string) {
  return useQuery(rejectsQueryOptions(siteId, gatewayId));
}
