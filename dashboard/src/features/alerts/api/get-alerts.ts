import { queryOptions, useQuery } from '@tanstack/react-query';
import type { AlertKind } from '@wellkept/core';
import { request } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export type AlertStatusFilter = 'open' | 'acknowledged' | 'cleared' | 'active' | 'all';

/** An alert as GET /api/alerts and GET /api/sites/:siteId/alerts send it. */
export interface Alert {
  id: string;
  siteId: string;
  siteName: string;
  kind: AlertKind;
  subject: string;
  severity: 'watch' | 'act';
  status: 'open' | 'acknowledged' | 'cleared';
  summary: string;
  evidence: unknown;
  openedAt: string;
  acknowledgedAt: string | null;
  acknowledgedBy: string | null;
  acknowledgeNote: string | null;
  clearedAt: string | null;
}

export interface AlertsFilter {
  /** Only this site (GET /sites/:siteId/alerts); every visible site otherwise. */
  siteId?: string;
  status: AlertStatusFilter;
  kind?: AlertKind;
}

export function getAlerts(filter: AlertsFilter): Promise<Alert[]> {
  const path = filter.siteId ? `/sites/${filter.siteId}/alerts` : '/alerts';
  return request<Alert[]>(path, { query: { status: filter.status, kind: filter.kind } });
}

/** Site alerts sit under ['sites', siteId] so a site's live updates refresh them too. */
export const alertsQueryOptions = (filter: AlertsFilter) =>
  queryOptions({
    queryKey: filter.siteId
      ? ([...queryKeys.siteAlerts(filter.siteId), filter.status, filter.kind ?? ''] as const)
      : ([...queryKeys.fleetAlerts, filter.status, filter.kind ?? ''] as const),
    queryFn: () => getAlerts(filter),
  });

export function useAlerts(filter: AlertsFilter) {
  return useQuery(alertsQueryOptions(filter));
}
