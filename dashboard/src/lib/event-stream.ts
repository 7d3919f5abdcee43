import { useEffect, useRef, useState } from 'react';
import { apiUrl } from './api-client';

/** `site-update` events as the API relays them: which site changed and what. */
export interface SiteUpdate {
  siteId: string;
  what: ('readings' | 'pump_runs' | 'alerts' | 'gateway')[];
  at: string;
}

export type StreamState = 'connecting' | 'open' | 'retrying' | 'off';

/**
 * Listens to a server-sent event stream under /api while the component is mounted. The
 * browser's EventSource reconnects by itself; `state` says whether updates are flowing, so
 * screens can say "live" honestly. Pass `path: null` to stay off.
 */
export function useEventStream<T>(
  path: string | null,
  onMessage: (data: T, event: string) => void,
  events: readonly string[] = ['message'],
): StreamState {
  const [state, setState] = useState<StreamState>(path ? 'connecting' : 'off');
  const handler = useRef(onMessage);
  handler.current = onMessage;
  const eventKey = events.join(',');

  useEffect(() => {
    if (!path || typeof EventSource === 'undefined') {
      setState('off');
      return;
    }
    const source = new EventSource(apiUrl(path), { withCredentials: true });
    setState('connecting');
    source.onopen = () => setState('open');
    source.onerror = () => setState(source.readyState === EventSource.CLOSED ? 'off' : 'retrying');
    const listeners = eventKey.split(',').map((name) => {
      const listener = (e: MessageEvent<string>) => {
        try {
          handler.current(JSON.parse(e.data) as T, name);
        } catch {
          // a malformed event is ignored; the next refetch repairs the cache
        }
      };
      source.addEventListener(name, listener);
      return [name, listener] as const;
    });
    return () => {
      for (const [name, listener] of listeners) source.removeEventListener(name, listener);
      source.close();
    };
  }, [path, eventKey]);

  return state;
}
