import { screen } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { renderWithApp } from '../../../../test/render';
import { VisitForm } from './visit-form';

describe('VisitForm', () => {
  it('refuses a visit without a summary and keeps what was typed', async () => {
    renderWithApp(<VisitForm siteId="s" />);
    await userEvent.type(screen.getByLabelText('What was found'), 'Float arm bent');
    await userEvent.click(screen.getByRole('button', { name: 'Save visit' }));
    expect(screen.getByLabelText('Summary')).toHaveAccessibleDescription(
      'Say in a few words what the visit was for',
    );
    expect(screen.getByLabelText('What was found')).toHaveValue('Float arm bent');
  });

  it('refuses a visit without a date', async () => {
    renderWithApp(<VisitForm siteId="s" />);
    await userEvent.clear(screen.getByLabelText('When'));
    await userEvent.type(screen.getByLabelText('Summary'), 'Pulled the pump');
    await userEvent.click(screen.getByRole('button', { name: 'Save visit' }));
    expect(screen.getByLabelText('When')).toHaveAccessibleDescription(
      'Enter the date and time of the visit',
    );
  });

  it('cautions about batteries, wiring and wells before the work is recorded', () => {
    renderWithApp(<VisitForm siteId="s" />);
    const caution = screen.getByRole('complementary', { name: 'Safety caution' });
    expect(caution).toHaveTextContent(/licensed|local/i);
    expect(caution).toHaveTextContent(/disinfect/);
  });
});
