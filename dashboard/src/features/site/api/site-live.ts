import { useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { useEventStream, type SiteUpdate, type StreamState } from '../../../lib/event-stream';
import { queryKeys } from '../../../lib/query-keys';

/**
 * GET /api/sites/:siteId/events (server-sent events, `site-update`): each change refetches
 * what this site's screens show (channels, series, runs, alerts: all keyed under
 * ['sites', siteId]) and the fleet overview, which holds the header's key numbers (charge,
 * water, days left). `tick` is bumped too, which slides "last 24 h"-style ranges up to now.
 */
export function useSiteLive(siteId: string): { state: StreamState; tick: number } {
  const queryClient = useQueryClient();
  const [tick, setTick] = useState(0);
  const state = useEventStream<SiteUpdate>(
    `/sites/${siteId}/events`,
    () => {
      setTick((t) => t + 1);
      void queryClient.invalidateQueries({ queryKey: queryKeys.site(siteId) });
      void queryClient.invalidateQueries({ queryKey: queryKeys.fleet });
    },
    ['site-update'],
  );
  return { state, tick };
}
