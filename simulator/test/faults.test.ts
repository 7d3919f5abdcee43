/**
 * Each fault leaves the signature its rule in core detects: the simulated site is replayed
 * through core's rule evaluators (`evaluateRules`) as readings arrive, and the alert the fault
 * should raise opens after the fault starts (and never before). A normal week of every demo
 * build raises nothing.
 */
import type { AlertKind } from '@wellkept/core';
import { describe, expect, it } from 'vitest';
import { type AlertChange, replayAlerts } from '../src/check/alert-replay.js';
import { demoSites } from '../src/demo/scenario.js';
import type { FaultKind, ScheduledFault } from '../src/faults/fault-kinds.js';
import type { SiteSpec } from '../src/site-spec.js';

const DAY = 86_400;
const fromT = Date.UTC(2026, 2, 10) / 1000;
const site = (key: string): SiteSpec => {
  const { faults: _demoFaults, ...spec } = demoSites.find((s) => s.key === key)!;
  return spec;
};

function opened(changes: AlertChange[], kind: AlertKind): AlertChange[] {
  return changes.filter((c) => c.action === 'open' && c.kind === kind);
}

interface FaultCase {
  kind: FaultKind;
  site: SiteSpec;
  alert: AlertKind;
  subject: string;
  target?: string;
  /** Simulated days after the fault starts. */
  days: number;
}

const cases: FaultCase[] = [
  {
    kind: 'float_stuck_closed',
    site: site('red-mesa-ranch'),
    alert: 'float_stuck',
    subject: 'north-float',
    target: 'north-float',
    days: 2,
  },
  // A small household tank with heavy use, so it runs low inside the test's few days.
  {
    kind: 'float_stuck_open',
    site: { ...site('quail-hollow'), waterUse: { dailyCubicMetres: 2.5, profile: 'household' } },
    alert: 'float_stuck',
    subject: 'cistern-full',
    days: 3,
  },
  {
    kind: 'well_drawn_down',
    site: site('quail-hollow'),
    alert: 'dry_run',
    subject: 'well',
    days: 2,
  },
  {
    kind: 'battery_aged',
    site: site('cedar-spring'),
    alert: 'overnight_sag',
    subject: '',
    days: 2,
  },
  {
    kind: 'parasitic_load',
    site: site('red-mesa-ranch'),
    alert: 'overnight_sag',
    subject: '',
    days: 2,
  },
  {
    kind: 'charge_controller_failed',
    site: site('cedar-spring'),
    alert: 'no_charge',
    subject: '',
    days: 2,
  },
  {
    kind: 'bladder_lost_precharge',
    site: site('pinon-ridge'),
    alert: 'short_cycling',
    subject: 'booster',
    days: 2,
  },
  {
    kind: 'gateway_offline',
    site: site('dune-gate'),
    alert: 'gateway_silent',
    subject: 'gw-dune-gate',
    days: 1,
  },
];

describe('each fault produces the signature its rule detects', () => {
  for (const c of cases) {
    it(`${c.kind} at ${c.site.key} opens ${c.alert}`, () => {
      const faultStart = fromT + DAY;
      const fault: ScheduledFault = {
        siteKey: c.site.key,
        kind: c.kind,
        startT: faultStart,
        endT: faultStart + c.days * DAY,
        ...(c.target ? { target: c.target } : {}),
      };
      const result = replayAlerts({
        site: c.site,
        faults: [fault],
        fromT,
        toT: faultStart + c.days * DAY,
      });
      const alerts = opened(result.changes, c.alert).filter((a) => a.subject === c.subject);
      expect(alerts.length, JSON.stringify(result.changes, null, 1)).toBeGreaterThan(0);
      // Not before the fault: the healthy day before it raises nothing of this kind.
      expect(alerts[0]!.t).toBeGreaterThan(faultStart);
      expect(opened(result.changes, c.alert).filter((a) => a.t <= faultStart)).toEqual([]);
    }, 60_000);
  }

  it('a gateway back from an outage clears its silent alert once its backlog arrives', () => {
    const s = site('dune-gate');
    const result = replayAlerts({
      site: s,
      faults: [
        { siteKey: s.key, kind: 'gateway_offline', startT: fromT + 3600, endT: fromT + 4 * 3600 },
      ],
      fromT,
      toT: fromT + 6 * 3600,
    });
    const silent = result.changes.filter((c) => c.kind === 'gateway_silent');
    expect(silent.map((c) => c.action)).toEqual(['open', 'clear']);
    // The readings of the outage arrived afterwards: no gap in the stored battery voltage.
    const volts = result.series.get('battery/voltage')!.map((x) => x.t);
    const gaps = volts.slice(1).map((t, i) => t - volts[i]!);
    expect(Math.max(...gaps)).toBe(60);
  }, 60_000);
});

describe('a normal week', () => {
  for (const spec of demoSites) {
    it(`raises no alert at ${spec.key}`, () => {
      const result = replayAlerts({ site: site(spec.key), fromT, toT: fromT + 7 * DAY });
      expect(result.changes).toEqual([]);
    }, 120_000);
  }
});
