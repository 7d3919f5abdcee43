import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AlertKind } from '@wellkept/core';
import { request } from '../../../lib/api-client';

/** GET /api/sites/:siteId/alert-settings: each alert's thresholds with the defaults shown. */
export interface AlertSetting {
  kind: AlertKind;
  enabled: boolean;
  params: Record<string, number>;
  defaults: Record<string, number>;
  effective: Record<string, number>;
  updatedAt: string | null;
}

export const alertSettingsQueryOptions = (siteId: string) =>
  queryOptions({
    queryKey: ['sites', siteId, 'alert-settings'] as const,
    queryFn: () => request<AlertSetting[]>(`/sites/${siteId}/alert-settings`),
  });

export function useAlertSettings(siteId: string) {
  return useQuery(alertSettingsQueryOptions(siteId));
}

/** PUT /api/sites/:siteId/alert-settings/:kind { enabled, params } (admins). */
export function usePutAlertSetting(siteId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: { kind: AlertKind; enabled: boolean; params: Record<string, number> }) =>
      request<AlertSetting>(`/sites/${siteId}/alert-settings/${input.kind}`, {
        method: 'PUT',
        body: { enabled: input.enabled, params: input.params },
      }),
    onSuccess: () =>
      queryClient.invalidateQueries({ queryKey: alertSettingsQueryOptions(siteId).queryKey }),
  });
}
