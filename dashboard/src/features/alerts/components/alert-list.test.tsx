import { screen } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { renderWithApp } from '../../../../test/render';
import type { Alert } from '../api/get-alerts';
import { AlertItem } from './alert-list';

function alert(overrides: Partial<Alert>): Alert {
  return {
    id: 'a1',
    siteId: 's1',
    siteName: 'Juniper Flat',
    kind: 'low_charge',
    subject: 'battery',
    severity: 'act',
    status: 'open',
    summary: 'Battery at 18 % and falling',
    evidence: null,
    openedAt: new Date(Date.now() - 600_000).toISOString(),
    acknowledgedAt: null,
    acknowledgedBy: null,
    acknowledgeNote: null,
    clearedAt: null,
    ...overrides,
  };
}

const caution = () => screen.queryByRole('complementary', { name: 'Safety caution' });

describe('AlertItem', () => {
  it('shows the battery and wiring caution beside an open battery alert for the trade', () => {
    renderWithApp(<AlertItem alert={alert({})} siteId="s1" canAcknowledge />);
    expect(caution()).toHaveTextContent(/Battery banks hold enough energy to start a fire/);
    expect(caution()).toHaveTextContent(/DC arcs do not put themselves out/);
  });

  it('shows the well caution beside an open pump alert', () => {
    renderWithApp(<AlertItem alert={alert({ kind: 'dry_run' })} siteId="s1" canAcknowledge />);
    expect(caution()).toHaveTextContent(/disinfect it afterwards/);
  });

  it('shows no caution once the alert has cleared', () => {
    renderWithApp(
      <AlertItem
        alert={alert({ status: 'cleared', clearedAt: new Date().toISOString() })}
        siteId="s1"
        canAcknowledge
      />,
    );
    expect(caution()).toBeNull();
  });

  it('words it for the owner without a caution of its own (the owner summary carries it once)', () => {
    renderWithApp(<AlertItem alert={alert({})} siteId="s1" plain canAcknowledge />);
    expect(screen.getByText('Your installer has been told about this.')).toBeInTheDocument();
    expect(screen.queryByText('Battery at 18 % and falling')).toBeNull();
    expect(caution()).toBeNull();
  });
});
