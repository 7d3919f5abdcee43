/**
 * Query-key prefixes shared across features, so one feature can refresh what another shows
 * without importing it (features stay independent; see eslint.config.js). Each feature's
 * query-options factory builds its keys from these.
 */
export const queryKeys = {
  /** GET /api/fleet: the board, and the key numbers in a site's header. */
  fleet: ['fleet'] as const,
  /** Everything about one site (channels, series, runs, alerts, visits, equipment). */
  site: (siteId: string) => ['sites', siteId] as const,
  /** One site's alert lists. */
  siteAlerts: (siteId: string) => ['sites', siteId, 'alerts'] as const,
  /** Alert lists across every visible site. */
  fleetAlerts: ['alerts'] as const,
};
