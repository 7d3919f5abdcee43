import { useQueryClient } from '@tanstack/react-query';
import { useEventStream, type StreamState } from '../../../lib/event-stream';
import { fleetQueryOptions } from './get-fleet';

/** `site_updates` as the API relays them: which site changed and what. */
export interface SiteUpdate {
  siteId: string;
  what: ('readings' | 'pump_runs' | 'alerts' | 'gateway')[];
  at: string;
}

/**
 * GET /api/events (server-sent events): every change to a visible site refetches the
 * board (one small request; the overview is computed server-side).
 */
export function useFleetLive(enabled = true): StreamState {
  const queryClient = useQueryClient();
  return useEventStream<SiteUpdate>(
    enabled ? '/events' : null,
    () => {
      void queryClient.invalidateQueries({ queryKey: fleetQueryOptions().queryKey });
    },
    ['site-update'],
  );
}
