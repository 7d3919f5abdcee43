import { useState, type FormEvent } from 'react';
import { FormError, FormField } from '../../../components/form-field';
import { formErrors, looksLikeEmail } from '../../../lib/form-errors';
import { useInvite } from '../api/invitations';
import type { Role } from '../api/users';

/** Invites a person by e-mail; owners are linked to at least one site. */
export function InviteForm(props: { sites: { id: string; name: string }[] }) {
  const invite = useInvite();
  const [email, setEmail] = useState('');
  const [name, setName] = useState('');
  const [role, setRole] = useState<Role>('technician');
  const [siteIds, setSiteIds] = useState<string[]>([]);
  const [local, setLocal] = useState<Record<string, string>>({});
  const server = formErrors(invite.error);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const problems: Record<string, string> = {};
    if (!looksLikeEmail(email)) problems.email = 'Enter an e-mail address';
    if (role === 'owner' && siteIds.length === 0)
      problems.siteIds = 'Pick at least one site for an owner';
    setLocal(problems);
    if (Object.keys(problems).length) return;
    invite.mutate(
      { email: email.trim(), name: name.trim(), role, siteIds: role === 'owner' ? siteIds : [] },
      {
        onSuccess: () => {
          setEmail('');
          setName('');
          setSiteIds([]);
        },
      },
    );
  };
  return (
    <form
      onSubmit={submit}
      noValidate
      className="wk-card space-y-3 p-4"
      aria-label="Invite someone"
    >
      <h2 className="font-semibold text-wk-ink-strong">Invite someone</h2>
      <div className="grid gap-3 sm:grid-cols-3">
        <FormField
          label="E-mail"
          type="email"
          value={email}
          onChange={(e) => setEmail(e.target.value)}
          error={local.email ?? server.fields.email}
        />
        <FormField
          label="Name (optional)"
          value={name}
          onChange={(e) => setName(e.target.value)}
          error={server.fields.name}
        />
        <label className="block text-label font-medium text-wk-ink">
          Role
          <select
            className="wk-input mt-1"
            value={role}
            onChange={(e) => setRole(e.target.value as Role)}
          >
            <option value="technician">Technician: every site, visits and alerts</option>
            <option value="owner">Owner: their own sites, in plain terms</option>
            <option value="admin">Admin: everything, including the team</option>
          </select>
        </label>
      </div>
      {role === 'owner' && (
        <fieldset>
          <legend className="text-label font-medium text-wk-ink">Sites this owner sees</legend>
          <div className="mt-1 grid gap-1 sm:grid-cols-2">
            {props.sites.map((s) => (
              <label key={s.id} className="flex items-center gap-2">
                <input
                  type="checkbox"
                  checked={siteIds.includes(s.id)}
                  onChange={(e) =>
                    setSiteIds(
                      e.target.checked ? [...siteIds, s.id] : siteIds.filter((x) => x !== s.id),
                    )
                  }
                />
                {s.name}
              </label>
            ))}
          </div>
          {(local.siteIds ?? server.fields.siteIds) && (
            <p className="mt-1 text-label font-medium text-wk-act">
              {local.siteIds ?? server.fields.siteIds}
            </p>
          )}
        </fieldset>
      )}
      <FormError message={server.message} />
      {invite.isSuccess && (
        <p role="status" className="text-label text-wk-steady">
          Invitation sent to {invite.data.email}.
        </p>
      )}
      <button type="submit" className="wk-button" disabled={invite.isPending}>
        {invite.isPending ? 'Sending…' : 'Send invitation'}
      </button>
    </form>
  );
}
