import { screen } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { renderWithApp } from '../../../../test/render';
import { InviteForm } from './invite-form';

const sites = [
  { id: 'a', name: 'Upper Meadow' },
  { id: 'b', name: 'Creek Bend' },
];

describe('InviteForm', () => {
  it('refuses an address that is not an e-mail address', async () => {
    renderWithApp(<InviteForm sites={sites} />);
    await userEvent.type(screen.getByLabelText('E-mail'), 'not-an-address');
    await userEvent.click(screen.getByRole('button', { name: 'Send invitation' }));
    expect(screen.getByLabelText('E-mail')).toHaveAccessibleDescription('Enter an e-mail address');
  });

  it('asks which sites an owner may see, and refuses an owner without one', async () => {
    renderWithApp(<InviteForm sites={sites} />);
    expect(screen.queryByRole('checkbox', { name: 'Upper Meadow' })).toBeNull();
    await userEvent.selectOptions(screen.getByLabelText(/^Role/), 'owner');
    expect(screen.getByRole('checkbox', { name: 'Upper Meadow' })).toBeInTheDocument();
    await userEvent.type(screen.getByLabelText('E-mail'), 'owner@people.example');
    await userEvent.click(screen.getByRole('button', { name: 'Send invitation' }));
    expect(screen.getByText('Pick at least one site for an owner')).toBeInTheDocument();
  });
});
