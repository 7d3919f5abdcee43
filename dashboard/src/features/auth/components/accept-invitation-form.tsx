import { useState, type FormEvent } from 'react';
import { FormError, FormField } from '../../../components/form-field';
import { Failure, Loading } from '../../../components/states';
import { ApiError } from '../../../lib/api-client';
import { formErrors, passwordProblem } from '../../../lib/form-errors';
import type { Me } from '../api/get-me';
import { useAcceptInvitation, useInvitation } from '../api/invitation';

const ROLE_WORDS = { admin: 'an admin', technician: 'a technician', owner: 'a site owner' };

/** Shows who invited whom, then sets the name and password and signs in. */
export function AcceptInvitationForm(props: { token: string; onAccepted: (me: Me) => void }) {
  const invitation = useInvitation(props.token);
  const accept = useAcceptInvitation();
  const [name, setName] = useState<string | null>(null);
  const [password, setPassword] = useState('');
  const [confirm, setConfirm] = useState('');
  const [local, setLocal] = useState<Record<string, string>>({});
  const server = formErrors(accept.error);

  if (props.token.length < 20) {
    return (
      <Failure
        error={new Error('This link is incomplete. Open the whole link from the e-mail.')}
        what="This invitation link does not work."
      />
    );
  }
  if (invitation.isPending) return <Loading label="Checking the invitation…" />;
  if (invitation.error) {
    const gone = invitation.error instanceof ApiError && invitation.error.status === 410;
    return (
      <Failure
        error={invitation.error}
        what={
          gone
            ? 'This invitation was already used or has expired. Ask for a new one.'
            : 'This invitation could not be opened.'
        }
      />
    );
  }
  const preview = invitation.data;
  const shownName = name ?? preview.name;

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const problems: Record<string, string> = {};
    if (!shownName.trim()) problems.name = 'Enter your name';
    const pw = passwordProblem(password);
    if (pw) problems.password = `Password ${pw}`;
    else if (password !== confirm) problems.confirm = 'The two passwords differ';
    setLocal(problems);
    if (Object.keys(problems).length) return;
    accept.mutate(
      { token: props.token, name: shownName.trim(), password },
      { onSuccess: props.onAccepted },
    );
  };

  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      <p className="text-wk-ink-soft">
        {preview.companyName} invited <strong className="text-wk-ink">{preview.email}</strong> to
        Wellkept as {ROLE_WORDS[preview.role]}.
      </p>
      <FormField
        label="Your name"
        name="name"
        autoComplete="name"
        value={shownName}
        onChange={(e) => setName(e.target.value)}
        error={local.name ?? server.fields.name}
      />
      <FormField
        label="Choose a password"
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
        name="confirm"
        autoComplete="new-password"
        value={confirm}
        onChange={(e) => setConfirm(e.target.value)}
        error={local.confirm}
      />
      <FormError message={server.message} />
      <button type="submit" className="wk-button w-full" disabled={accept.isPending}>
        {accept.isPending ? 'Creating your account…' : 'Accept and sign in'}
      </button>
    </form>
  );
}
