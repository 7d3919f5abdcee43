import { RULE_EVALUATORS } from '@wellkept/core';
import type { SiteForRules } from './site-config.repository.js';

/**
 * The sites a tick may leave out of its gateway-silence round, because their evaluation is sure
 * to change nothing: no gateway_silent alert is open there, and core's own evaluator, given the
 * newest time among the site's channels, finds no gateway silent. The channels' times trail
 * the commits by a few seconds (they are written in batches), so a site can only look quieter
 * than it is, never busier: a site that might be silent is still evaluated in full, from the
 * readings themselves. At 10,000 sites the round was 10,000 evaluations a minute, three
 * queries each, nearly all of them deciding nothing.
 *
 * @param newestT newest channel time per site, epoch seconds (absent: never reported)
 * @param withOpenAlert sites with a gateway_silent alert not yet cleared
 */
export function sitesSurelyReporting(
  sites: ReadonlyMap<string, SiteForRules>,
  newestT: ReadonlyMap<string, number>,
  withOpenAlert: ReadonlySet<string>,
  nowT: number,
): Set<string> {
  const reporting = new Set<string>();
  for (const [id, site] of sites) {
    const newest = newestT.get(id);
    if (newest === undefined || withOpenAlert.has(id)) continue;
    const last = Math.min(newest, nowT);
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
    if (decisions.every((d) => d.action === 'none')) reporting.add(id);
  }
  return reporting;
}
