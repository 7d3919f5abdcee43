import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';

/** GET /api/sites/:siteId/series: the server picks raw or bucketed points (≤ 2,000 each). */
export interface SeriesResponse {
  siteId: string;
  from: string;
  to: string;
  resolution: {
    source: 'raw' | 'minute' | 'ten_minute' | 'hour' | 'six_hour' | 'day';
    stepSeconds: number;
    label: string;
  };
  rowsRead: number;
  series: {
    channel: string;
    unit: string;
    valueKind: 'number' | 'boolean';
    t: number[];
    mean: number[];
    min: number[];
    max: number[];
  }[];
}

export interface SeriesRequest {
  siteId: string;
  channels: string[];
  /** ms since the epoch */
  from: number;
  to: number;
}

export function getSeries(req: SeriesRequest, signal?: AbortSignal): Promise<SeriesResponse> {
  return request<SeriesResponse>(`/sites/${req.siteId}/series`, {
    query: {
      channels: req.channels.join(','),
      from: new Date(req.from).toISOString(),
      to: new Date(req.to).toISOString(),
    },
    signal,
  });
}

export const seriesQueryOptions = (req: SeriesRequest) =>
  queryOptions({
    queryKey: ['sites', req.siteId, 'series', req.channels.join(','), req.from, req.to] as const,
    queryFn: ({ signal }) => getSeries(req, signal),
    enabled: req.channels.length > 0,
    // Keep the old lines on screen while a zoom or pan fetches the new range.
    placeholderData: keepPreviousData,
  });

export function useSeries(req: SeriesRequest) {
  return useQuery(seriesQueryOptions(req));
}
