import { useMutation, useQueryClient } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';
import type { Alert } from './get-alerts';

/** POST /api/sites/:siteId/alerts/:alertId/acknowledge { note } */
export function acknowledgeAlert(input: {
  siteId: string;
  alertId: string;
  note: string;
}): Promise<Alert> {
  return request<Alert>(`/sites/${input.siteId}/alerts/${input.alertId}/acknowledge`, {
    method: 'POST',
    body: { note: input.note },
  });
}

export function useAcknowledgeAlert() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: acknowledgeAlert,
    onSuccess: (_alert, input) => {
      void queryClient.invalidateQueries({ queryKey: queryKeys.fleetAlerts });
      void queryClient.invalidateQueries({ queryKey: queryKeys.siteAlerts(input.siteId) });
      void queryClient.invalidateQueries({ queryKey: queryKeys.fleet });
    },
  });
}
