import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiUrl, request } from '../../../lib/api-client';

export interface Attachment {
  id: string;
  fileName: string;
  contentType: 'image/jpeg' | 'image/png' | 'image/webp' | 'application/pdf';
  sizeBytes: number;
  hasThumbnail: boolean;
  createdAt: string;
}

/** GET /api/sites/:siteId/visits: newest first, with attachments. */
export interface Visit {
  id: string;
  siteId: string;
  visitedAt: string;
  technicianId: string | null;
  technicianName: string | null;
  summary: string;
  findings: string;
  partsReplaced: string;
  createdAt: string;
  updatedAt: string;
  attachments: Attachment[];
}

export function getVisits(siteId: string): Promise<Visit[]> {
  return request<Visit[]>(`/sites/${siteId}/visits`);
}

export const visitsQueryOptions = (siteId: string) =>
  queryOptions({
    queryKey: ['sites', siteId, 'visits'] as const,
    queryFn: () => getVisits(siteId),
  });

export function useVisits(siteId: string) {
  return useQuery(visitsQueryOptions(siteId));
}

/** GET /api/sites/:siteId/attachments/:id (download) and …/thumbnail (WebP, 320 px). */
export const attachmentUrl = (siteId: string, id: string) =>
  apiUrl(`/sites/${siteId}/attachments/${id}`);
export const thumbnailUrl = (siteId: string, id: string) =>
  apiUrl(`/sites/${siteId}/attachments/${id}/thumbnail`);
