import { describe, expect, it } from 'vitest';
import type { FleetSite } from '../api/get-fleet';
import { boardFigures } from './board-figures';

const site: FleetSite = {
  id: 'a',
  name: 'Test site',
  locality: '',
  health: 'steady',
  healthReason: 'nothing open',
  lastSeenAt: null,
  openAlerts: { count: 0, kinds: [] },
  battery: {
    stateOfChargePercent: 72.4,
    lowPercent: 60,
    highPercent: 85,
    confidence: 'wide',
    volts: 25.1,
    at: null,
  },
  // 1 m³ is 264.172 US gallons or 1,000 litres.
  water: { storedM3: 1, capacityM3: 2, percent: 50, daysLeft: 4.25, at: null },
  spark: null,
};

describe('boardFigures', () => {
  it('shows water in gallons for US customary', () => {
    const f = boardFigures(site, 'us');
    expect(f.stored?.text).toBe('264\u00a0gal');
    expect(f.fullness?.text).toBe('50%');
    expect(f.daysLeft?.text).toBe('4.3\u00a0days');
    expect(f.charge?.text).toBe('72%');
    expect(f.chargeBand).toBe('60–85 %');
  });

  it('shows the same water in litres for metric', () => {
    expect(boardFigures(site, 'metric').stored?.text).toBe('1,000\u00a0L');
  });

  it('leaves out what a site does not have', () => {
    const f = boardFigures({ ...site, water: null, battery: null }, 'metric');
    expect(f.stored).toBeNull();
    expect(f.charge).toBeNull();
    expect(f.daysLeft).toBeNull();
  });
});
