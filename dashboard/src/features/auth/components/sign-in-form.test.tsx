import { screen } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { renderWithApp } from '../../../../test/render';
import { SignInForm } from './sign-in-form';

describe('SignInForm', () => {
  it('names each missing field and does not sign in', async () => {
    const onSignedIn = vi.fn();
    renderWithApp(<SignInForm onSignedIn={onSignedIn} resetHref="/reset-password" />);
    await userEvent.click(screen.getByRole('button', { name: 'Sign in' }));
    expect(screen.getByLabelText('E-mail')).toHaveAccessibleDescription(
      'Enter the e-mail address you were invited with',
    );
    expect(screen.getByLabelText('Password')).toHaveAccessibleDescription('Enter your password');
    expect(screen.getByLabelText('E-mail')).toHaveAttribute('aria-invalid', 'true');
    expect(onSignedIn).not.toHaveBeenCalled();
  });

  it('rejects an address without a domain but accepts the password', async () => {
    renderWithApp(<SignInForm onSignedIn={() => {}} resetHref="/reset-password" />);
    await userEvent.type(screen.getByLabelText('E-mail'), 'someone@');
    await userEvent.type(screen.getByLabelText('Password'), 'long enough password');
    await userEvent.click(screen.getByRole('button', { name: 'Sign in' }));
    expect(screen.getByText('Enter the e-mail address you were invited with')).toBeInTheDocument();
    expect(screen.queryByText('Enter your password')).not.toBeInTheDocument();
  });
});
