import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';

/** GET /api/sites/:siteId/gateways (never their secrets). */
export interface Gateway {
  id: string;
  name: string;
  status: 'active' | 'revoked';
  online: boolean;
  lastSeenAt: string | null;
  createdAt: string;
  rotatedAt: string | null;
  revokedAt: string | null;
}

/** The answer to create and rotate: the secret, shown this once. */
export interface GatewayWithSecret {
  gateway: Gateway;
  secret: string;
  mqtt: { username: string; clientId: string; topic: string };
}

export const gatewaysQueryOptions = (siteId: string) =>
  queryOptions({
    queryKey: ['sites', siteId, 'gateways'] as const,
    queryFn: () => request<Gateway[]>(`/sites/${siteId}/gateways`),
  });

export function useGateways(siteId: string) {
  return useQuery(gatewaysQueryOptions(siteId));
}

/** POST /api/sites/:siteId/gateways { id, name } */
export function useCreateGateway(siteId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { id: string; name: string }) =>
      request<GatewayWithSecret>(`/sites/${siteId}/gateways`, { method: 'POST', body }),
    onSuccess: () =>
      queryClient.invalidateQueries({ queryKey: gatewaysQueryOptions(siteId).queryKey }),
  });
}

/** POST /api/sites/:siteId/gateways/:id/rotate and …/revoke */
export function useGatewayAction(siteId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: { gatewayId: string; action: 'rotate' | 'revoke' }) =>
      request<GatewayWithSecret | Gateway>(
        `/sites/${siteId}/gateways/${input.gatewayId}/${input.action}`,
        {
          method: 'POST',
        },
      ),
    onSuccess: () =>
      queryClient.invalidateQueries({ queryKey: gatewaysQueryOptions(siteId).queryKey }),
  });
}
