import { RULE_EVALUATORS } from '@wellkept/core';
import type { SiteForRules } from './site-config.repository.js';

/**
 * Whether a tick may leave a site out of its gateway-silence round, because its evaluation is
 * sure to change nothing: no gateway_silent alert is open there, and core's own evaluator, given
 * the newest time among the site's channels, finds no gateway silent. The channels' times trail
 * the commits by a few seconds (they are written in batches), so a site can only look quieter
 * than it is, never busier: a site that might be silent is still evaluated in full, from the
 * readings themselves. At 10,000 sites the round was 10,000 evaluations a minute, three queries
 * each, nearly all of them deciding nothing. About 7 us a site here: the tick calls it site by
 * site, between its pauses for socket reads and commits.
 *
 * @param newestT newest channel time at the site, epoch seconds (undefined: never reported)
 * @param hasOpenAlert a gateway_silent alert of the site is not yet cleared
 */
export function surelyReporting(
  site: SiteForRules,
  newestT: number | undefined,
  hasOpenAlert: boolean,
  nowT: number,
): boolean {
  if (newestT === undefined || hasOpenAlert) return false;
  const last = Math.min(newestT, nowT);
  const decisions = RULE_EVALUATORS.gateway_silent(
    {
      nowT,
      site: site.config,
      series: {},
      lastReadingT: Object.fromEntries(site.config.gateways.map((g) => [g.id, last])),
      openAlerts: [],
    },
    site.overrides,
  );
  return decisions.every((d) => d.action === 'none');
}
