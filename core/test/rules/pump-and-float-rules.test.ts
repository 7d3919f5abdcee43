import { describe, expect, it } from 'vitest';
import {
  evaluateDryRun,
  evaluateFloatStuck,
  evaluateShortCycling,
  type Sample,
} from '../../src/index.js';
import { cisternLevelAt, input, ranchSite, series } from './fixtures.js';

const NOW = Date.UTC(2025, 5, 10, 18) / 1000; // noon local
const site = ranchSite();

const decisionFor = <T extends { subject: string }>(decisions: T[], subject: string): T => {
  const d = decisions.find((x) => x.subject === subject);
  if (!d) throw new Error(`no decision for ${subject}`);
  return d;
};

describe('float_stuck', () => {
  it('opens when the float never opens and the pump runs on with the tank full', () => {
    const from = NOW - 3600;
    const data = {
      'tank/cistern/level': series(from, NOW, 60, () => cisternLevelAt(site, 1.0)),
      'pump/well/running': series(from, NOW, 60, () => true),
      'float/fill/closed': series(from, NOW, 60, () => true), // still calling for water
    };
    const d = decisionFor(evaluateFloatStuck(input(site, NOW, data)), 'fill');
    expect(d.action).toBe('open');
    expect(d.severity).toBe('act');
    expect(d.summary).toBe(
      'Pump well has run for over 10 min with tank cistern 100 % full: float fill is not stopping it',
    );
    expect(d.evidence?.observed.find((e) => e.label === 'Pump running throughout')?.value).toBe(
      true,
    );
  });

  it('opens when the tank is low and the float never calls', () => {
    const from = NOW - 3600;
    const data = {
      'tank/cistern/level': series(from, NOW, 60, () => cisternLevelAt(site, 0.15)),
      'pump/well/running': series(from, NOW, 60, () => false),
      'float/fill/closed': series(from, NOW, 60, () => false),
    };
    const d = decisionFor(evaluateFloatStuck(input(site, NOW, data)), 'fill');
    expect(d.action).toBe('open');
    expect(d.summary).toMatch(/has not called for water/);
  });

  it('must NOT alert: a tank filling normally, the float opening as it reaches the top', () => {
    const from = NOW - 2 * 3600;
    const fillEnd = NOW - 300; // float opens 5 minutes ago
    const fraction = (t: number) => Math.min(0.5 + (0.47 * (t - from)) / (fillEnd - from), 0.97);
    const data = {
      'tank/cistern/level': series(from, NOW, 60, (t) => cisternLevelAt(site, fraction(t))),
      'pump/well/running': series(from, NOW, 60, (t) => t < fillEnd),
      'float/fill/closed': series(from, NOW, 60, (t) => t < fillEnd),
    };
    const d = decisionFor(evaluateFloatStuck(input(site, NOW, data)), 'fill');
    expect(d.action).toBe('none');
  });

  it('clears with hysteresis: only after the healthy state has held for the clear window', () => {
    const openAlert = {
      kind: 'float_stuck' as const,
      subject: 'fill',
      openedT: NOW - 7200,
      severity: 'act' as const,
    };
    const stoppedAt = NOW - 600; // pump stopped 10 min ago; clear window is 15 min
    const data = {
      'tank/cistern/level': series(NOW - 3600, NOW, 60, () => cisternLevelAt(site, 0.99)),
      'pump/well/running': series(NOW - 3600, NOW, 60, (t) => t < stoppedAt),
      'float/fill/closed': series(NOW - 3600, NOW, 60, (t) => t < stoppedAt),
    };
    expect(
      decisionFor(evaluateFloatStuck(input(site, NOW, data, [openAlert])), 'fill').action,
    ).toBe('keep');
    const later = NOW + 900;
    const laterData = {
      ...data,
      'tank/cistern/level': series(NOW - 3600, later, 60, () => cisternLevelAt(site, 0.99)),
      'pump/well/running': series(NOW - 3600, later, 60, (t) => t < stoppedAt),
    };
    expect(
      decisionFor(evaluateFloatStuck(input(site, later, laterData, [openAlert])), 'fill').action,
    ).toBe('clear');
  });
});

describe('dry_run', () => {
  it('opens when a pump runs at 40 % of its rated current', () => {
    const from = NOW - 900;
    const data = {
      'pump/well/running': series(from, NOW, 30, () => true),
      'pump/well/current': series(from, NOW, 30, () => 0.4 * 8),
    };
    const d = decisionFor(evaluateDryRun(input(site, NOW, data)), 'well');
    expect(d.action).toBe('open');
    expect(d.severity).toBe('act');
    expect(d.summary).toBe(
      'Pump well is running at 40 % of its rated current for over 3 min: it may be running dry',
    );
    expect(
      d.evidence?.observed.find((e) => e.label === 'Share of rated current')?.value,
    ).toBeCloseTo(0.4, 9);
  });

  it('opens when a long run does not raise the tank', () => {
    const from = NOW - 3000;
    const data = {
      'pump/well/running': series(from, NOW, 60, (t) => t < NOW - 600),
      'pump/well/current': series(from, NOW, 60, (t) => (t < NOW - 600 ? 7.6 : 0)),
      'tank/cistern/level': series(from - 3600, NOW, 60, () => cisternLevelAt(site, 0.5)),
    };
    const d = decisionFor(evaluateDryRun(input(site, NOW, data)), 'well');
    expect(d.action).toBe('open');
    expect(d.summary).toMatch(/did not rise/);
  });

  it('must NOT alert: a run at rated current into a tank already full (that is float_stuck)', () => {
    const from = NOW - 3000;
    const data = {
      'pump/well/running': series(from, NOW, 60, (t) => t < NOW - 600),
      'pump/well/current': series(from, NOW, 60, (t) => (t < NOW - 600 ? 7.6 : 0)),
      'tank/cistern/level': series(from - 3600, NOW, 60, () => cisternLevelAt(site, 1.0)),
    };
    expect(decisionFor(evaluateDryRun(input(site, NOW, data)), 'well').action).toBe('none');
  });

  it('must NOT alert: a normal run at rated current with the tank rising', () => {
    const from = NOW - 3000;
    const data = {
      'pump/well/running': series(from, NOW, 60, (t) => t < NOW - 600),
      'pump/well/current': series(from, NOW, 60, (t) => (t < NOW - 600 ? 7.8 : 0)),
      'tank/cistern/level': series(from - 3600, NOW, 60, (t) =>
        cisternLevelAt(
          site,
          0.5 + (t > from && t < NOW - 600 ? (0.1 * (t - from)) / 2400 : t >= NOW - 600 ? 0.1 : 0),
        ),
      ),
    };
    expect(decisionFor(evaluateDryRun(input(site, NOW, data)), 'well').action).toBe('none');
  });

  it('must NOT alert: a PV-direct pump drawing 40 % on a cloudy day', () => {
    const pvSite = ranchSite({
      pumps: [
        {
          key: 'well',
          ratedCurrentAmps: 8,
          supply: 'pv_direct',
          pvArrayKey: 'roof',
          fillsTankKey: null,
        },
      ],
    });
    const from = NOW - 900;
    const data = {
      'pump/well/running': series(from, NOW, 30, () => true),
      'pump/well/current': series(from, NOW, 30, () => 0.4 * 8),
      'pv/roof/voltage': series(from, NOW, 30, () => 60),
      'pv/roof/current': series(from, NOW, 30, () => 4), // 240 W of 1200 W: cloud
    };
    const d = decisionFor(evaluateDryRun(input(pvSite, NOW, data)), 'well');
    expect(d.action).toBe('none');
    // and in full sun the same low current does open
    const sunny = { ...data, 'pv/roof/current': series(from, NOW, 30, () => 14) };
    expect(decisionFor(evaluateDryRun(input(pvSite, NOW, sunny)), 'well').action).toBe('open');
  });
});

describe('short_cycling', () => {
  it('opens on nine starts in ten minutes', () => {
    // source: common practice (makers' motor manuals; memory): runs of at least 1 minute
    const running: Sample<boolean>[] = [];
    const start = NOW - 700;
    for (let i = 0; i < 9; i += 1) {
      running.push({ t: start + i * 66, v: true }, { t: start + i * 66 + 30, v: false });
    }
    const d = decisionFor(
      evaluateShortCycling(input(site, NOW, { 'pump/booster/running': running })),
      'booster',
    );
    expect(d.action).toBe('open');
    expect(d.severity).toBe('act');
    expect(d.summary).toBe(
      'Pump booster is short cycling: 9 starts in 10 min, 9 runs shorter than 60 s in the last hour',
    );
  });

  it('must NOT alert: a booster starting three times an hour for three minutes each', () => {
    const running: Sample<boolean>[] = [];
    for (let t = NOW - 86_400; t < NOW; t += 1200)
      running.push({ t, v: true }, { t: t + 180, v: false });
    const d = decisionFor(
      evaluateShortCycling(input(site, NOW, { 'pump/booster/running': running })),
      'booster',
    );
    expect(d.action).toBe('none');
  });

  it('the daily limit is lower for motors over about 0.75 hp, and overridable per pump', () => {
    const running: Sample<boolean>[] = [];
    for (let t = NOW - 86_000; t < NOW - 3600; t += 600)
      running.push({ t, v: true }, { t: t + 120, v: false });
    // 138 starts in the day, 2 minutes each
    const bigPump = ranchSite({
      pumps: [{ key: 'booster', ratedCurrentAmps: 30, ratedWatts: 1100 }],
    });
    const d = decisionFor(
      evaluateShortCycling(input(bigPump, NOW, { 'pump/booster/running': running })),
      'booster',
    );
    expect(d.action).toBe('open');
    const relaxed = evaluateShortCycling(input(bigPump, NOW, { 'pump/booster/running': running }), {
      short_cycling: { bySubject: { booster: { maxStartsPerDay: 200 } } },
    });
    expect(decisionFor(relaxed, 'booster').action).toBe('none');
  });
});
