import { screen } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { renderWithApp } from '../../../../test/render';
import { SettingsForm } from './settings-form';

const settings = {
  name: 'Pat Example',
  email: 'pat@people.example',
  unitSystem: 'us' as const,
  timeZone: 'America/Denver',
  quietHours: null,
};

describe('SettingsForm', () => {
  it('offers both unit systems with an example of each', () => {
    renderWithApp(<SettingsForm settings={settings} />);
    expect(screen.getByRole('radio', { name: /US customary/ })).toBeChecked();
    expect(screen.getByText('(e.g. 264 gal)')).toBeInTheDocument();
    expect(screen.getByText('(e.g. 1,000 L)')).toBeInTheDocument();
  });

  it('refuses quiet hours that start and end at the same time', async () => {
    renderWithApp(<SettingsForm settings={settings} />);
    await userEvent.click(screen.getByRole('checkbox', { name: /No alert e-mails/ }));
    const until = screen.getByLabelText('Until');
    await userEvent.clear(until);
    await userEvent.type(until, '22:00');
    await userEvent.click(screen.getByRole('button', { name: 'Save settings' }));
    expect(until).toHaveAccessibleDescription('Start and end must differ');
  });

  it('refuses an empty name', async () => {
    renderWithApp(<SettingsForm settings={settings} />);
    await userEvent.clear(screen.getByLabelText('Name'));
    await userEvent.click(screen.getByRole('button', { name: 'Save settings' }));
    expect(screen.getByLabelText('Name')).toHaveAccessibleDescription('Enter your name');
  });
});
