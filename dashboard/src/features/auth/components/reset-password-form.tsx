import { useState, type FormEvent } from 'react';
import { FormError, FormField } from '../../../components/form-field';
import { formErrors, looksLikeEmail, passwordProblem } from '../../../lib/form-errors';
import { useConfirmPasswordReset, useRequestPasswordReset } from '../api/password-reset';

/** Asks for a reset link. The answer never says whether the address has an account. */
export function RequestResetForm() {
  const reset = useRequestPasswordReset();
  const [email, setEmail] = useState('');
  const [local, setLocal] = useState<string>();
  const server = formErrors(reset.error);

  if (reset.isSuccess) {
    return (
      <p role="status" className="text-wk-ink">
        If <strong>{email.trim()}</strong> has a Wellkept account, a link to set a new password is
        on its way. It works for one hour.
      </p>
    );
  }
  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!looksLikeEmail(email)) return setLocal('Enter your e-mail address');
    setLocal(undefined);
    reset.mutate(email.trim());
  };
  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      <FormField
        label="E-mail"
        type="email"
        name="email"
        autoComplete="username"
        value={email}
        onChange={(e) => setEmail(e.target.value)}
        error={local ?? server.fields.email}
      />
      <FormError message={server.message} />
      <button type="submit" className="wk-button w-full" disabled={reset.isPending}>
        {reset.isPending ? 'Sending…' : 'Send me a link'}
      </button>
    </form>
  );
}

/** Sets a new password from the e-mailed link. */
export function ConfirmResetForm(props: { token: string; signInHref: string }) {
  const confirmReset = useConfirmPasswordReset();
  const [password, setPassword] = useState('');
  const [again, setAgain] = useState('');
  const [local, setLocal] = useState<Record<string, string>>({});
  const server = formErrors(confirmReset.error);

  if (confirmReset.isSuccess) {
    return (
      <p role="status">
        Your password is changed and every other session is signed out.{' '}
        <a className="wk-link" href={props.signInHref}>
          Sign in
        </a>
      </p>
    );
  }
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const problems: Record<string, string> = {};
    const pw = passwordProblem(password);
    if (pw) problems.password = `Password ${pw}`;
    else if (password !== again) problems.again = 'The two passwords differ';
    setLocal(problems);
    if (Object.keys(problems).length) return;
    confirmReset.mutate({ token: props.token, password });
  };
  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      <FormField
        label="New password"
        type="password"
        name="password"
        autoComplete="new-password"
        hint="At least 10 characters."
        value={password}
        onChange={(e) => setPassword(e.target.value)}
        error={local.password ?? server.fields.password}
      />
      <FormField
        label="Type it again"
        type="password"
        name="again"
        autoComplete="new-password"
        value={again}
        onChange={(e) => setAgain(e.target.value)}
        error={local.again}
      />
      <FormError message={server.message ?? server.fields.token} />
      <button type="submit" className="wk-button w-full" disabled={confirmReset.isPending}>
        {confirmReset.isPending ? 'Saving…' : 'Set new password'}
      </button>
    </form>
  );
}
