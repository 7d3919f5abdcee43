import { useMutation, useQueryClient } from '@tanstack/react-query';
import { request } from '../../../lib/api-client';
import { type Visit, visitsQueryOptions } from './get-visits';

export interface CreateVisitBody {
  visitedAt: string;
  summary: string;
  findings: string;
  partsReplaced: string;
}

/** POST /api/sites/:siteId/visits (technicians and admins). */
export function createVisit(siteId: string, body: CreateVisitBody): Promise<Visit> {
  return request<Visit>(`/sites/${siteId}/visits`, { method: 'POST', body });
}

export function useCreateVisit(siteId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateVisitBody) => createVisit(siteId, body),
    onSuccess: () =>
      queryClient.invalidateQueries({ queryKey: visitsQueryOptions(siteId).queryKey }),
  });
}
