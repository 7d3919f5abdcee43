import { useState, type FormEvent } from 'react';
import { FormError, FormField } from '../../../components/form-field';
import { formErrors, looksLikeEmail } from '../../../lib/form-errors';
import type { Me } from '../api/get-me';
import { useSignIn } from '../api/sign-in';

/** E-mail and password. Wrong credentials and paused accounts come back as one plain line. */
export function SignInForm(props: { onSignedIn: (me: Me) => void; resetHref: string }) {
  const signIn = useSignIn();
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const [local, setLocal] = useState<Record<string, string>>({});
  const server = formErrors(signIn.error);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const problems: Record<string, string> = {};
    if (!looksLikeEmail(email)) problems.email = 'Enter the e-mail address you were invited with';
    if (!password) problems.password = 'Enter your password';
    setLocal(problems);
    if (Object.keys(problems).length) return;
    signIn.mutate({ email: email.trim(), password }, { onSuccess: props.onSignedIn });
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
        error={local.email ?? server.fields.email}
      />
      <FormField
        label="Password"
        type="password"
        name="password"
        autoComplete="current-password"
        value={password}
        onChange={(e) => setPassword(e.target.value)}
        error={local.password ?? server.fields.password}
      />
      <FormError message={server.message} />
      <button type="submit" className="wk-button w-full" disabled={signIn.isPending}>
        {signIn.isPending ? 'Signing in…' : 'Sign in'}
      </button>
      <p className="text-center text-label">
        <a className="wk-link" href={props.resetHref}>
          Forgot your password?
        </a>
      </p>
    </form>
  );
}
