/**
 * Site health from its open alerts and its data: `steady` (nothing open), `watch` (a warning
 * open), `act` (something needs a visit or an owner's action now), `silent` (no data).
 */
import type { AlertSeverity, OpenAlert } from './rules/types.js';

/** Site health (our names). */
export type SiteHealth = 'steady' | 'watch' | 'act' | 'silent';

/** Words for each health state; screens pair them with a shape, never colour alone. */
export const SITE_HEALTH_LABELS: Readonly<Record<SiteHealth, string>> = {
  steady: 'Steady',
  watch: 'Watch',
  act: 'Act now',
  silent: 'Silent',
};

/** Worst first, for the fleet list: act, silent, watch, steady. */
export const SITE_HEALTH_ORDER: readonly SiteHealth[] = ['act', 'silent', 'watch', 'steady'];

/**
 * Health of a site: `act` when any open alert other than gateway_silent needs action; otherwise
 * `silent` when a gateway_silent alert is open or no reading is newer than `silentAfterSeconds`; otherwise `watch`
 * when any alert is open; otherwise `steady`.
 */
export function siteHealth(params: {
  openAlerts: readonly Pick<OpenAlert, 'kind' | 'severity'>[];
  /** Newest reading from the site, epoch seconds, or null when it never reported. */
  lastReadingT: number | null;
  nowT: number;
  /** Default 15 minutes. */
  silentAfterSeconds?: number;
}): SiteHealth {
  // A gateway-silent alert says "no data", whatever its severity: it makes the site silent,
  // not act, so the board tells a quiet gateway from a site that needs a visit.
  const severities: AlertSeverity[] = params.openAlerts
    .filter((a) => a.kind !== 'gateway_silent')
    .map((a) => a.severity);
  if (severities.includes('act')) return 'act';
  const silentAfter = params.silentAfterSeconds ?? 900;
  const noData = params.lastReadingT === null || params.nowT - params.lastReadingT > silentAfter;
  if (noData || params.openAlerts.some((a) => a.kind === 'gateway_silent')) return 'silent';
  return severities.length > 0 ? 'watch' : 'steady';
}

/** Compares two health states for sorting worst first. */
export function compareSiteHealth(a: SiteHealth, b: SiteHealth): number {
  return SITE_HEALTH_ORDER.indexOf(a) - SITE_HEALTH_ORDER.indexOf(b);
}
