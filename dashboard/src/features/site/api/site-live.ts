import { useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { useEventStream, type StreamState } from '../../../lib/event-stream';

/**
 * GET /api/sites/:siteId/events (server-sent events, `site-update`): each change refetches
 * what this site's screens show (channels, series, runs, alerts: all keyed under
 * ['sites', siteId]) and bumps `tick`, which slides "last 24 h"-style ranges up to now.
 */
export function useSiteLive(siteId: string): { state: StreamState; tick: number } {
  const queryClient = useQueryClient();
  const [tick, setTick] = useState(0);
  const state = useEventStream<{ siteId: string; what: string[] }>(
    `/sites/${siteId}/events`,
    () => {
      setTick((t) => t + 1);
      void queryClient.invalidateQueries({ queryKey: ['sites', siteId] });
    },
    ['site-update'],
  );
  return { state, tick };
}
