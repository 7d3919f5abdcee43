import { screen } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { renderWithApp } from '../../../../test/render';
import type { Well } from '../api/get-equipment';
import { WellForm } from './well-form';

const well: Well = {
  id: '00000000-0000-0000-0000-000000000001',
  depthM: 60.96, // 200 ft
  casingDiameterM: 0.1016, // 4 in
  staticLevelM: 30.48, // 100 ft
  pumpSettingM: null,
  notes: '',
};

describe('WellForm', () => {
  it('shows a stored well in feet and inches for US customary', () => {
    renderWithApp(<WellForm siteId="s" well={well} />, { unitSystem: 'us' });
    expect(screen.getByLabelText(/Well depth/)).toHaveValue('200');
    expect(screen.getByLabelText('Well depth (ft)')).toBeInTheDocument();
    expect(screen.getByLabelText(/Casing diameter/)).toHaveValue('4');
    expect(screen.getByLabelText(/Static water level/)).toHaveValue('100');
  });

  it('shows the same well in metres and millimetres for metric', () => {
    renderWithApp(<WellForm siteId="s" well={well} />, { unitSystem: 'metric' });
    expect(screen.getByLabelText(/Well depth/)).toHaveValue('61');
    expect(screen.getByLabelText(/Casing diameter/)).toHaveValue('102');
    expect(screen.getByLabelText(/Static water level/)).toHaveValue('30.5');
  });

  it('refuses a water level below the bottom of the well', async () => {
    renderWithApp(<WellForm siteId="s" well={well} />, { unitSystem: 'us' });
    const level = screen.getByLabelText(/Static water level/);
    await userEvent.clear(level);
    await userEvent.type(level, '250');
    await userEvent.click(screen.getByRole('button', { name: 'Save well' }));
    expect(level).toHaveAccessibleDescription(/Must be between zero and the well depth/);
  });

  it('shows the caution about work on wells', () => {
    renderWithApp(<WellForm siteId="s" well={null} />);
    expect(screen.getByRole('complementary', { name: 'Safety caution' })).toHaveTextContent(
      /disinfect it afterwards/,
    );
  });
});
