import { describe, expect, it } from 'vitest';
import {
  type RuleDecision,
  type Sample,
  defaultRuleParams,
  evaluateGatewaySilent,
  evaluateLowCharge,
  evaluateNoCharge,
  evaluateOvernightSag,
  evaluateRules,
  evaluateWaterLow,
  overnightWindow,
  ruleParamsFor,
  siteHealth,
  compareSiteHealth,
  clearSkyPvWatts,
} from '../../src/index.js';
import { cisternLevelAt, input, ranchSite, series } from './fixtures.js';

const site = ranchSite();
const siteTz = { ...site.location, timeZone: site.timeZone };
// A summer night at the fictional ranch, judged two hours after sunrise.
const NIGHT = overnightWindow(Date.UTC(2025, 5, 11, 9) / 1000, siteTz); // 03:00 local
if (!NIGHT) throw new Error('no night');
const AFTER_DAWN = NIGHT.endT + 2 * 3600;

/**
 * Battery voltage over the night: charging voltage before sunset, settling for an hour, steady for
 * half an hour, a linear fall, and steady again for the half hour before sunrise.
 */
function nightVoltages(settledVolts: number, dawnVolts: number): Sample[] {
  const settled = NIGHT!.startT + 3600;
  const fallFrom = settled + 1800;
  const fallTo = NIGHT!.endT - 1800;
  return series(NIGHT!.startT - 3600, AFTER_DAWN, 300, (t) => {
    if (t < NIGHT!.startT) return 27.0; // still charging
    if (t < settled) return 27.0 - ((27.0 - settledVolts) * (t - NIGHT!.startT)) / 3600;
    if (t < fallFrom) return settledVolts;
    if (t < fallTo)
      return settledVolts - ((settledVolts - dawnVolts) * (t - fallFrom)) / (fallTo - fallFrom);
    if (t <= NIGHT!.endT) return dawnVolts;
    return 26.5; // charging again after sunrise
  });
}

const only = (decisions: RuleDecision[]) => {
  expect(decisions).toHaveLength(1);
  return decisions[0] as RuleDecision;
};

describe('overnight_sag', () => {
  it('opens when a 24 V bank loses 0.8 V overnight', () => {
    const d = only(
      evaluateOvernightSag(
        input(site, AFTER_DAWN, { 'battery/voltage': nightVoltages(25.3, 24.5) }),
      ),
    );
    expect(d.action).toBe('open');
    expect(d.severity).toBe('watch');
    expect(d.summary).toBe('Battery fell 0.80 V overnight (limit 0.50 V)');
    expect(d.evidence?.observed.find((e) => e.label === 'Overnight fall')?.value).toBeCloseTo(
      0.8,
      2,
    );
  });

  it('must NOT alert: a normal night (0.25 V)', () => {
    const d = only(
      evaluateOvernightSag(
        input(site, AFTER_DAWN, { 'battery/voltage': nightVoltages(25.3, 25.05) }),
      ),
    );
    expect(d.action).toBe('none');
  });

  it('opens as "act" when the dawn voltage is under the floor', () => {
    const d = only(
      evaluateOvernightSag(
        input(site, AFTER_DAWN, { 'battery/voltage': nightVoltages(24.4, 24.1) }),
      ),
    );
    expect(d.action).toBe('open');
    expect(d.severity).toBe('act');
    expect(d.summary).toMatch(/at dawn \(floor 24\.24 V\)/);
  });

  it('clears after a good night, and keeps on a night still within the hysteresis band', () => {
    const open = [
      {
        kind: 'overnight_sag' as const,
        subject: '',
        openedT: NIGHT!.endT - 86_400,
        severity: 'watch' as const,
      },
    ];
    const good = only(
      evaluateOvernightSag(
        input(site, AFTER_DAWN, { 'battery/voltage': nightVoltages(25.3, 25.1) }, open),
      ),
    );
    expect(good.action).toBe('clear');
    const borderline = only(
      evaluateOvernightSag(
        input(site, AFTER_DAWN, { 'battery/voltage': nightVoltages(25.3, 24.85) }, open),
      ),
    );
    expect(borderline.action).toBe('keep');
  });
});

describe('low_charge', () => {
  const now = NIGHT!.endT - 600; // just before dawn
  const resting = (volts: number) => ({
    'battery/voltage': series(now - 6 * 3600, now, 300, () => volts),
    'battery/current': series(now - 6 * 3600, now, 300, () => -0.5),
  });
  it('opens when the rested bank sits under the 50 % floor', () => {
    const d = only(evaluateLowCharge(input(site, now, resting(24.36))));
    expect(d.action).toBe('open');
    expect(d.severity).toBe('watch');
    expect(d.summary).toBe('Battery about 42 % charged, under the 50 % floor');
  });
  it('"act" when deeply discharged', () => {
    expect(only(evaluateLowCharge(input(site, now, resting(23.9)))).severity).toBe('act');
  });
  it('must NOT alert: a normal night on a healthy bank', () => {
    expect(only(evaluateLowCharge(input(site, now, resting(25.1)))).action).toBe('none');
  });
  it('never opens on a LiFePO4 bank resting on its plateau', () => {
    const lfp = ranchSite({
      battery: { chemistry: 'lifepo4', nominalVolts: 24, capacityAmpHours: 200 },
    });
    const d = only(evaluateLowCharge(input(lfp, now, resting(8 * 3.2))));
    expect(d.action).toBe('none');
  });
});

describe('no_charge', () => {
  const noon = Date.UTC(2025, 5, 11, 19) / 1000; // 13:00 local, summer
  const from = noon - 4 * 3600;
  const expected = (t: number) => clearSkyPvWatts(site.pvArrays[0]!, t, site.location);
  it('opens when a clear day gives no charge for hours', () => {
    const data = {
      'pv/roof/voltage': series(from, noon, 300, () => 2),
      'pv/roof/current': series(from, noon, 300, () => 0),
      'controller/stage': series(from, noon, 900, () => 'off'),
    };
    const d = only(evaluateNoCharge(input(site, noon, data)));
    expect(d.action).toBe('open');
    expect(d.summary).toMatch(/^Not charging: 0 % of the clear-sky expectation/);
  });
  it('must NOT alert: a cloudy day giving a fifth of the clear-sky figure', () => {
    const data = {
      'pv/roof/voltage': series(from, noon, 300, () => 60),
      'pv/roof/current': series(from, noon, 300, (t) => (0.2 * expected(t)) / 60),
    };
    expect(only(evaluateNoCharge(input(site, noon, data))).action).toBe('none');
  });
  it('must NOT alert: a full bank with the controller holding float', () => {
    const data = {
      'pv/roof/voltage': series(from, noon, 300, () => 70),
      'pv/roof/current': series(from, noon, 300, () => 0.05),
      'controller/stage': series(from, noon, 300, () => 'float'),
    };
    expect(only(evaluateNoCharge(input(site, noon, data))).action).toBe('none');
  });
  it('must NOT alert: at night there is no expectation to miss', () => {
    const midnight = NIGHT!.startT + 3 * 3600;
    const data = { 'battery/current': series(midnight - 4 * 3600, midnight, 300, () => -2) };
    expect(only(evaluateNoCharge(input(site, midnight, data))).action).toBe('none');
  });
});

describe('water_low', () => {
  const now = Date.UTC(2025, 5, 11, 18) / 1000;
  it('opens when days of water left fall under the floor', () => {
    // 0.5 m³ a day drawn, about 0.6 m³ left
    const capacity = Math.PI * 1.2 ** 2 * 2.2;
    const data = {
      'tank/cistern/level': series(now - 3 * 86_400, now, 1800, (t) =>
        cisternLevelAt(site, (0.6 + (0.5 * (now - t)) / 86_400) / capacity),
      ),
    };
    const d = only(evaluateWaterLow(input(site, now, data)));
    expect(d.action).toBe('open');
    expect(d.severity).toBe('watch');
    expect(d.summary).toBe('Tank cistern has about 1.2 days of water left at recent use');
  });
  it('must NOT alert: a tank filling normally', () => {
    const data = {
      'tank/cistern/level': series(now - 3 * 86_400, now, 1800, (t) =>
        cisternLevelAt(site, 0.3 + (0.5 * (t - now + 3 * 86_400)) / (3 * 86_400)),
      ),
    };
    expect(only(evaluateWaterLow(input(site, now, data))).action).toBe('none');
  });
});

describe('gateway_silent', () => {
  const now = Date.UTC(2025, 5, 11, 18) / 1000;
  it('opens after five reporting intervals without data, "act" after six hours', () => {
    const quiet = { 'battery/voltage': [{ t: now - 600, v: 25 }] };
    const d = only(evaluateGatewaySilent(input(site, now, quiet)));
    expect(d).toMatchObject({
      action: 'open',
      severity: 'watch',
      summary: 'No data from gateway gw-ranch-1 for 10 min',
    });
    const long = { 'battery/voltage': [{ t: now - 7 * 3600, v: 25 }] };
    expect(only(evaluateGatewaySilent(input(site, now, long))).severity).toBe('act');
  });
  it('must NOT alert while data flow, and clears when they come back', () => {
    const fresh = { 'battery/voltage': [{ t: now - 30, v: 25 }] };
    expect(only(evaluateGatewaySilent(input(site, now, fresh))).action).toBe('none');
    const open = [
      {
        kind: 'gateway_silent' as const,
        subject: 'gw-ranch-1',
        openedT: now - 3600,
        severity: 'watch' as const,
      },
    ];
    expect(only(evaluateGatewaySilent(input(site, now, fresh, open))).action).toBe('clear');
  });
});

describe('a whole site on a normal night', () => {
  it('opens nothing', () => {
    const now = NIGHT!.endT - 1800;
    const from = now - 2 * 86_400;
    const data = {
      'battery/voltage': series(from, now, 300, () => 25.2),
      'battery/current': series(from, now, 300, () => -1),
      'tank/cistern/level': series(from, now, 300, () => cisternLevelAt(site, 0.8)),
      'pump/well/running': series(from, now, 300, () => false),
      'pump/booster/running': series(from, now, 300, () => false),
      'float/fill/closed': series(from, now, 300, () => false),
    };
    const decisions = evaluateRules(input(site, now, data));
    expect(decisions.filter((d) => d.action === 'open')).toEqual([]);
    expect(new Set(decisions.map((d) => d.kind))).toEqual(
      new Set([
        'low_charge',
        'overnight_sag',
        'float_stuck',
        'dry_run',
        'short_cycling',
        'gateway_silent',
        'water_low',
        'no_charge',
      ]),
    );
  });
});

describe('rule parameters', () => {
  it('defaults follow the chemistry', () => {
    expect(defaultRuleParams(site).low_charge.floorFraction).toBe(0.5);
    const lfp = defaultRuleParams({
      battery: { chemistry: 'lifepo4', nominalVolts: 24, capacityAmpHours: 200 },
    });
    expect(lfp.low_charge.floorFraction).toBe(0.2);
    // source: common practice (makers' motor manuals; memory); rule thresholds are settings
    expect(defaultRuleParams(site).short_cycling.maxStartsPerDay).toBe(300);
    expect(defaultRuleParams(site).short_cycling.minRunSeconds).toBe(60);
  });
  it('site overrides apply, and per-subject overrides win over them; bad numbers are ignored', () => {
    const params = ruleParamsFor(
      'water_low',
      site,
      { water_low: { floorDays: 4, bySubject: { cistern: { floorDays: 5 } } } },
      'cistern',
    );
    expect(params.floorDays).toBe(5);
    expect(
      ruleParamsFor('water_low', site, { water_low: { floorDays: 4 } }, 'other').floorDays,
    ).toBe(4);
    expect(
      ruleParamsFor('water_low', site, { water_low: { floorDays: Number.NaN } }).floorDays,
    ).toBe(2);
  });
});

describe('site health', () => {
  const now = 1_750_000_000;
  it('steady, watch, act and silent', () => {
    expect(siteHealth({ openAlerts: [], lastReadingT: now - 60, nowT: now })).toBe('steady');
    expect(
      siteHealth({
        openAlerts: [{ kind: 'water_low', severity: 'watch' }],
        lastReadingT: now - 60,
        nowT: now,
      }),
    ).toBe('watch');
    expect(
      siteHealth({
        openAlerts: [{ kind: 'dry_run', severity: 'act' }],
        lastReadingT: now - 60,
        nowT: now,
      }),
    ).toBe('act');
    expect(siteHealth({ openAlerts: [], lastReadingT: now - 3600, nowT: now })).toBe('silent');
    expect(siteHealth({ openAlerts: [], lastReadingT: null, nowT: now })).toBe('silent');
  });
  it('a gateway-silent alert makes the site silent, even at act severity; another act alert wins', () => {
    const silentAct = { kind: 'gateway_silent', severity: 'act' } as const;
    expect(siteHealth({ openAlerts: [silentAct], lastReadingT: now - 60, nowT: now })).toBe(
      'silent',
    );
    expect(
      siteHealth({
        openAlerts: [silentAct, { kind: 'dry_run', severity: 'act' }],
        lastReadingT: now - 7200,
        nowT: now,
      }),
    ).toBe('act');
  });
  it('sorts worst first', () => {
    const sorted = (['steady', 'watch', 'silent', 'act'] as const).slice().sort(compareSiteHealth);
    expect(sorted).toEqual(['act', 'silent', 'watch', 'steady']);
  });
});
