import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadCredentials, loadSimulatorConfig } from '../src/config/sim-config.js';
import { parseFaultFlag, parseInstant, parseSpanSeconds } from '../src/faults/fault-schedule.js';

const now = 1_800_000_000;
const sites = ['red-mesa-ranch', 'owl-creek-cabin'];

describe('--fault flags', () => {
  it('reads site, kind, start, duration and target', () => {
    expect(
      parseFaultFlag('red-mesa-ranch:float_stuck_closed@-1d+10d=north-float', now, sites),
    ).toEqual({
      siteKey: 'red-mesa-ranch',
      kind: 'float_stuck_closed',
      startT: now - 86_400,
      endT: now - 86_400 + 10 * 86_400,
      target: 'north-float',
    });
    const f = parseFaultFlag(
      'owl-creek-cabin:parasitic_load@2026-01-01T00:00:00Z+36h=8',
      now,
      sites,
    );
    expect(f.startT).toBe(Date.UTC(2026, 0, 1) / 1000);
    expect(f.endT - f.startT).toBe(36 * 3600);
    expect(f.target).toBe('8');
    // Defaults: from now, for a day.
    expect(parseFaultFlag('owl-creek-cabin:battery_aged', now, sites)).toMatchObject({
      startT: now,
      endT: now + 86_400,
    });
  });

  it('says what is wrong with a bad flag', () => {
    expect(() => parseFaultFlag('nowhere:battery_aged', now, sites)).toThrow(
      /no site "nowhere".*red-mesa-ranch/,
    );
    expect(() => parseFaultFlag('owl-creek-cabin:battery_gone', now, sites)).toThrow(
      /"battery_gone" is not a fault.*float_stuck_closed/,
    );
    expect(() => parseFaultFlag('owl-creek-cabin:battery_aged@yesterday', now, sites)).toThrow(
      /"yesterday" is not a time/,
    );
    expect(() => parseFaultFlag('owl-creek-cabin:battery_aged+3w', now, sites)).toThrow(
      /"3w" is not a time span/,
    );
    expect(() => parseFaultFlag('owl-creek-cabin:parasitic_load=lots', now, sites)).toThrow(
      /current in amps/,
    );
    expect(() => parseFaultFlag('just-words', now, sites)).toThrow(/expected <site>:<kind>/);
  });

  it('parses spans and instants', () => {
    expect(parseSpanSeconds('90s')).toBe(90);
    expect(parseSpanSeconds('15m')).toBe(900);
    expect(parseSpanSeconds('1.5h')).toBe(5400);
    expect(parseInstant('+2h', now)).toBe(now + 7200);
    expect(parseInstant('now', now)).toBe(now);
  });
});

describe('config and credentials files', () => {
  const dir = mkdtempSync(join(tmpdir(), 'wk-sim-config-'));

  it('reads faults against the demo sites and names the bad field of a bad file', () => {
    const good = join(dir, 'good.json');
    writeFileSync(
      good,
      JSON.stringify({
        faults: [
          { site: 'cedar-spring', kind: 'charge_controller_failed', start: '-2h', duration: '6h' },
        ],
      }),
    );
    const config = loadSimulatorConfig(good, now);
    expect(config.sites.length).toBe(8);
    expect(config.faults).toEqual([
      {
        siteKey: 'cedar-spring',
        kind: 'charge_controller_failed',
        startT: now - 7200,
        endT: now - 7200 + 6 * 3600,
      },
    ]);
    const bad = join(dir, 'bad.json');
    writeFileSync(bad, JSON.stringify({ sites: [{ key: 'x', latitude: 95 }] }));
    expect(() => loadSimulatorConfig(bad, now)).toThrow(/sites\.0\.latitude/);
    const unknown = join(dir, 'unknown-fault.json');
    writeFileSync(unknown, JSON.stringify({ faults: [{ site: 'cedar-spring', kind: 'meteor' }] }));
    expect(() => loadSimulatorConfig(unknown, now)).toThrow(/faults\[0\].*"meteor" is not a fault/);
    const notJson = join(dir, 'not.json');
    writeFileSync(notJson, '{ sites: ');
    expect(() => loadSimulatorConfig(notJson, now)).toThrow(/not valid JSON/);
    expect(() => loadSimulatorConfig(join(dir, 'missing.json'), now)).toThrow(/does not exist/);
  });

  it('reads credentials and refuses entries without a secret', () => {
    const file = join(dir, 'creds.json');
    writeFileSync(
      file,
      JSON.stringify([{ gatewayId: 'gw-cedar-spring', secret: 's3cret', siteKey: 'cedar-spring' }]),
    );
    expect(loadCredentials(file)).toEqual([{ gatewayId: 'gw-cedar-spring', secret: 's3cret' }]);
    writeFileSync(file, JSON.stringify([{ gatewayId: 'gw-cedar-spring' }]));
    expect(() => loadCredentials(file)).toThrow(/0\.secret/);
  });
});
