import { queryOptions, useQuery } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';

/** GET /api/sites/:siteId/channels: measurement channels with their latest values. */
export interface Channel {
  id: number;
  name: string;
  unit: string;
  valueKind: 'number' | 'boolean' | 'string';
  lastTime: string | null;
  lastValue: number | null;
  lastText: string | null;
}

export function getChannels(siteId: string): Promise<Channel[]> {
  return request<Channel[]>(`/sites/${siteId}/channels`);
}

export const channelsQueryOptions = (siteId: string) =>
  queryOptions({
    queryKey: ['sites', siteId, 'channels'] as const,
    queryFn: () => getChannels(siteId),
  });

export function useChannels(siteId: string) {
  return useQuery(channelsQueryOptions(siteId));
}
