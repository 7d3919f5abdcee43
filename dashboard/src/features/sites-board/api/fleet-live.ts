import { useQueryClient } from '@tanstack/react-query';
import { useEventStream, type SiteUpdate, type StreamState } from '../../../lib/event-stream';
import { queryKeys } from '../../../lib/query-keys';

/**
 * GET /api/events (server-sent events): every change to a visible site refetches the
 * board (one small request; the overview is computed server-side).
 */
export function useFleetLive(enabled = true): StreamState {
  const queryClient = useQueryClient();
  return useEventStream<SiteUpdate>(
    enabled ? '/events' : null,
    () => {
      void queryClient.invalidateQueries({ queryKey: queryKeys.fleet });
    },
    ['site-update'],
  );
}
