import { screen } from '@testing-library/react';
import type { UnitSystem } from '@wellkept/core';
import { describe, expect, it } from 'vitest';
import { renderWithApp } from '../../../test/render';
import type { FleetSite } from '../../features/sites-board/api/get-fleet';
import { boardFigures } from '../../features/sites-board/components/board-figures';
import { OwnerSummary, chargeWords } from '../../features/site/components/owner-summary';

// 3.785 m³ is 1,000 US gallons; the figures come from the API in SI.
const site: FleetSite = {
  id: 's',
  name: 'Creek Bend',
  locality: '',
  health: 'watch',
  healthReason: '1 alert open',
  lastSeenAt: new Date().toISOString(),
  openAlerts: { count: 1, kinds: ['overnight_sag'] },
  battery: {
    stateOfChargePercent: 42,
    lowPercent: 38,
    highPercent: 46,
    confidence: 'good',
    volts: 24.6,
    at: null,
  },
  water: { storedM3: 3.785411784, capacityM3: 5, percent: 75.7, daysLeft: 6.5, at: null },
  spark: null,
};

function renderFor(system: UnitSystem) {
  const f = boardFigures(site, system);
  return renderWithApp(
    <OwnerSummary
      siteName={site.name}
      health={site.health}
      healthReason={site.healthReason}
      stored={f.stored}
      fullness={f.fullness}
      daysLeft={f.daysLeft}
      charge={f.charge}
      chargePercent={site.battery!.stateOfChargePercent}
      lastSeenAt={site.lastSeenAt}
    />,
    { unitSystem: system },
  );
}

describe('OwnerSummary', () => {
  it('shows water in US gallons for a US customary person', () => {
    renderFor('us');
    expect(screen.getByLabelText(/^Water in storage:/)).toHaveTextContent(/^1,000\s*gal$/);
    expect(screen.getByText(/6\.5\s*days/)).toBeInTheDocument();
  });

  it('shows the same water in litres for a metric person', () => {
    renderFor('metric');
    expect(screen.getByLabelText(/^Water in storage:/)).toHaveTextContent(/^3,785\s*L$/);
  });

  it('puts the battery charge in words as well as percent', () => {
    renderFor('us');
    expect(screen.getByLabelText(/^Battery charge:/)).toHaveTextContent(/42\s*%/);
    expect(screen.getByText('Getting low: go easy on power tonight')).toBeInTheDocument();
    expect(chargeWords(null)).toMatch(/cannot be read/);
  });

  it('gives the band when the voltage cannot pin the charge down', () => {
    renderWithApp(
      <OwnerSummary
        siteName="Creek Bend"
        health="steady"
        healthReason=""
        stored={null}
        fullness={null}
        daysLeft={null}
        charge={null}
        chargePercent={null}
        chargeBand="20–90 %"
        lastSeenAt={null}
      />,
    );
    expect(screen.getByText(/Somewhere between/)).toHaveTextContent(
      'Somewhere between 20–90 %: the battery voltage alone cannot say more just now.',
    );
    expect(screen.getByText('No tank level is reported for this site.')).toBeInTheDocument();
  });

  it('tells the owner to leave enclosures closed, never to open them', () => {
    renderFor('us');
    expect(screen.getByRole('complementary', { name: 'Safety caution' })).toHaveTextContent(
      /leave enclosures and battery boxes closed/,
    );
  });
});
