import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';

export interface PumpRun {
  id: number;
  pumpId: string;
  pumpKey: string;
  pumpName: string;
  startedAt: string;
  endedAt: string | null;
  durationS: number | null;
  energyWh: number | null;
  meanCurrentA: number | null;
  waterM3: number | null;
  waterSource: 'tank_rise' | 'flow' | null;
  spansGap: boolean;
}

/** GET /api/sites/:siteId/pump-runs: newest first, totals over the whole filter. */
export interface PumpRunsPage {
  runs: PumpRun[];
  totals: { runs: number; runSeconds: number; energyWh: number; waterM3: number };
  nextBefore: string | null;
}

export interface PumpRunsFilter {
  siteId: string;
  pumpId?: string;
  /** ISO instants */
  from?: string;
  to?: string;
  before?: string;
}

export function getPumpRuns(f: PumpRunsFilter): Promise<PumpRunsPage> {
  return request<PumpRunsPage>(`/sites/${f.siteId}/pump-runs`, {
    query: { pumpId: f.pumpId, from: f.from, to: f.to, before: f.before, limit: 200 },
  });
}

export const pumpRunsQueryOptions = (f: PumpRunsFilter) =>
  queryOptions({
    queryKey: [
      'sites',
      f.siteId,
      'pump-runs',
      f.pumpId ?? '',
      f.from ?? '',
      f.to ?? '',
      f.before ?? '',
    ] as const,
    queryFn: () => getPumpRuns(f),
    placeholderData: keepPreviousData,
  });

export function usePumpRuns(f: PumpRunsFilter) {
  return useQuery(pumpRunsQueryOptions(f));
}
