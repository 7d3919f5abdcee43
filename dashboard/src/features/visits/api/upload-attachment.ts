import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { request } from '../../../lib/api-client';
import { type Attachment, visitsQueryOptions } from './get-visits';

/** POST /api/sites/:siteId/visits/:visitId/attachments (multipart field "file"), with progress. */
export function uploadAttachment(
  siteId: string,
  visitId: string,
  file: File,
  onProgress: (fraction: number) => void,
): Promise<Attachment> {
  const form = new FormData();
  form.append('file', file, file.name);
  return request<Attachment>(`/sites/${siteId}/visits/${visitId}/attachments`, {
    method: 'POST',
    body: form,
    onUploadProgress: onProgress,
  });
}

export function useUploadAttachment(siteId: string, visitId: string) {
  const queryClient = useQueryClient();
  const [progress, setProgress] = useState<number | null>(null);
  const mutation = useMutation({
    mutationFn: (file: File) => uploadAttachment(siteId, visitId, file, setProgress),
    onMutate: () => setProgress(0),
    onSettled: () => {
      setProgress(null);
      return queryClient.invalidateQueries({ queryKey: visitsQueryOptions(siteId).queryKey });
    },
  });
  return { ...mutation, progress };
}
