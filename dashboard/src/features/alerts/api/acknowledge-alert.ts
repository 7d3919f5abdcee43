import { useMutation, useQueryClient } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';
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
      void queryClient.invalidateQueries({ queryKey: ['alerts'] });
      void queryClient.invalidateQueries({ queryKey: ['sites', input.siteId, 'alerts'] });
      void queryClient.invalidateQueries({ queryKey: ['fleet'] });
    },
  });
}
