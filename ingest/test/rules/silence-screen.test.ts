import { describe, expect, it } from 'vitest';
import { surelyReporting } from '../../src/rules/silence-screen.js';
import type { SiteForRules } from '../../src/rules/site-config.repository.js';

// Our own contract (no published value): a site is left out of the tick's silence round only
// when core's gateway_silent evaluator would decide nothing for it.

const nowT = Date.UTC(2026, 11, 3, 12) / 1000;

function site(
  id: string,
  reportingIntervalSeconds: number,
  overrides: SiteForRules['overrides'] = {},
): SiteForRules {
  return {
    id,
    companyId: 'company',
    name: id,
    config: {
      timeZone: 'UTC',
      location: { latitudeDegrees: 35, longitudeDegrees: -106, elevationMetres: 1500 },
      battery: null,
      pvArrays: [],
      pumps: [],
      tanks: [],
      floatSwitches: [],
      gateways: [{ id: `gw-${id}`, reportingIntervalSeconds }],
    },
    overrides,
    disabled: new Set(),
    equipmentNames: new Map(),
  };
}

/** The sites of `sites` that the tick may leave out of its silence round. */
function sitesSurelyReporting(
  sites: ReadonlyMap<string, SiteForRules>,
  newest: ReadonlyMap<string, number>,
  withOpenAlert: ReadonlySet<string>,
  nowT: number,
): Set<string> {
  return new Set(
    [...sites.values()]
      .filter((s) => surelyReporting(s, newest.get(s.id), withOpenAlert.has(s.id), nowT))
      .map((s) => s.id),
  );
}

describe('surelyReporting', () => {
  it('keeps only sites whose gateways are within their limit and have no open alert', () => {
    // Reporting every 60 s: silent after 5 intervals (300 s, core's default).
    const sites = new Map(
      ['recent', 'edge', 'silent', 'alerted', 'never', 'ahead', 'patient'].map((id) => [
        id,
        site(id, 60, id === 'patient' ? { gateway_silent: { silentAfterIntervals: 20 } } : {}),
      ]),
    );
    const newest = new Map([
      ['recent', nowT - 30],
      ['edge', nowT - 300],
      ['silent', nowT - 301],
      ['alerted', nowT - 30],
      // A gateway clock a little ahead: counts as now.
      ['ahead', nowT + 120],
      // Quiet for 10 intervals, but this site allows 20.
      ['patient', nowT - 600],
    ]);
    const reporting = sitesSurelyReporting(sites, newest, new Set(['alerted']), nowT);
    expect([...reporting].sort()).toEqual(['ahead', 'edge', 'patient', 'recent']);
  });

  it("follows each site's own reporting interval", () => {
    const sites = new Map([
      ['slow', site('slow', 900)],
      ['fast', site('fast', 10)],
    ]);
    const newest = new Map([
      ['slow', nowT - 1800],
      ['fast', nowT - 1800],
    ]);
    expect([...sitesSurelyReporting(sites, newest, new Set(), nowT)]).toEqual(['slow']);
  });
});
