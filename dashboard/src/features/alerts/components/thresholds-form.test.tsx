import { screen, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { renderWithApp } from '../../../../test/render';
import type { AlertSetting } from '../api/alert-settings';
import { ThresholdForm, thresholdLabel } from './thresholds-form';

const dryRun: AlertSetting = {
  kind: 'dry_run',
  enabled: true,
  params: { holdSeconds: 240 },
  defaults: { lowCurrentFraction: 0.6, holdSeconds: 180 },
  effective: { lowCurrentFraction: 0.6, holdSeconds: 240 },
  updatedAt: null,
};

describe('ThresholdForm', () => {
  it('names each threshold with its unit and shows the default beside it', () => {
    renderWithApp(<ThresholdForm siteId="s" setting={dryRun} canEdit />);
    const form = screen.getByRole('form', { name: 'Running dry' });
    const hold = within(form).getByRole('textbox', { name: /hold \(s\) \(default 180\)/ });
    expect(hold).toHaveValue('240');
    const low = within(form).getByRole('textbox', { name: /low current \(share, 0–1\)/ });
    // Not overridden: empty, with the default as its placeholder.
    expect(low).toHaveValue('');
    expect(low).toHaveAttribute('placeholder', '0.6');
    expect(within(form).getByText('(default 0.6)')).toBeInTheDocument();
  });

  it('refuses a negative or non-numeric threshold and says which', async () => {
    renderWithApp(<ThresholdForm siteId="s" setting={dryRun} canEdit />);
    const hold = screen.getByRole('textbox', { name: /hold/ });
    await userEvent.clear(hold);
    await userEvent.type(hold, '-5');
    const low = screen.getByRole('textbox', { name: /low current/ });
    await userEvent.type(low, 'lots');
    await userEvent.click(screen.getByRole('button', { name: 'Save' }));
    expect(screen.getAllByText('must be a number, zero or more')).toHaveLength(2);
  });

  it('is read-only for people who may not change thresholds', () => {
    renderWithApp(<ThresholdForm siteId="s" setting={dryRun} canEdit={false} />);
    expect(screen.getByRole('textbox', { name: /hold/ })).toBeDisabled();
    expect(screen.getByRole('checkbox', { name: 'Running dry' })).toBeDisabled();
    expect(screen.queryByRole('button', { name: 'Save' })).toBeNull();
  });

  it('turns parameter names into words with units', () => {
    expect(thresholdLabel('dawnFloorVoltsPerCell')).toBe('dawn floor (V per cell)');
    expect(thresholdLabel('maxStartsPerHour')).toBe('max starts per hour');
  });
});
