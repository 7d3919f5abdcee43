import { Table, TableBody, TableCell, TableHead, TableHeaderCell, TableRow } from '@tremor/react';
import { FormError } from '../../../components/form-field';
import { Empty, QueryState } from '../../../components/states';
import { formErrors } from '../../../lib/form-errors';
import { usePersonSettings } from '../../../lib/person-settings';
import { formatAgo, formatDate } from '../../../lib/time-format';
import { useInvitations, useRevokeInvitation } from '../api/invitations';
import { type Role, useDeactivateUser, useUpdateUser, useUsers } from '../api/users';
import { InviteForm } from './invite-form';

/** The company's people: invite, change a role, deactivate; pending invitations. */
export function TeamPage(props: { myId: string; sites: { id: string; name: string }[] }) {
  const users = useUsers();
  const invitations = useInvitations();
  const update = useUpdateUser();
  const deactivate = useDeactivateUser();
  const revoke = useRevokeInvitation();
  const { timeZone } = usePersonSettings();
  const error = formErrors(update.error ?? deactivate.error ?? revoke.error).message;
  return (
    <section className="space-y-4" aria-labelledby="team-title">
      <h1 id="team-title" className="text-headline font-semibold text-wk-ink-strong">
        Team
      </h1>
      <InviteForm sites={props.sites} />
      <FormError message={error} />
      <QueryState query={users} what="The team could not be loaded.">
        {(list) => (
          <div className="wk-card overflow-x-auto">
            <Table>
              <TableHead>
                <TableRow>
                  <TableHeaderCell>Person</TableHeaderCell>
                  <TableHeaderCell>Role</TableHeaderCell>
                  <TableHeaderCell>Last sign-in</TableHeaderCell>
                  <TableHeaderCell>
                    <span className="sr-only">Actions</span>
                  </TableHeaderCell>
                </TableRow>
              </TableHead>
              <TableBody>
                {list.map((p) => (
                  <TableRow key={p.id} data-user={p.email}>
                    <TableCell>
                      <div className="font-medium text-wk-ink-strong">{p.name}</div>
                      <div className="text-label text-wk-ink-soft">
                        {p.email}
                        {!p.active && ' · deactivated'}
                        {p.role === 'owner' &&
                          ` · ${p.siteIds.length} site${p.siteIds.length === 1 ? '' : 's'}`}
                      </div>
                    </TableCell>
                    <TableCell>
                      <label>
                        <span className="sr-only">Role of {p.name}</span>
                        <select
                          className="wk-input w-auto py-1"
                          value={p.role}
                          disabled={!p.active || p.id === props.myId || update.isPending}
                          onChange={(e) =>
                            update.mutate({ userId: p.id, role: e.target.value as Role })
                          }
                        >
                          <option value="admin">Admin</option>
                          <option value="technician">Technician</option>
                          <option value="owner">Owner</option>
                        </select>
                      </label>
                    </TableCell>
                    <TableCell>{p.lastSignInAt ? formatAgo(p.lastSignInAt) : 'never'}</TableCell>
                    <TableCell>
                      {p.active && p.id !== props.myId && (
                        <button
                          type="button"
                          className="wk-button-quiet text-wk-act"
                          onClick={() => {
                            if (
                              window.confirm(
                                `Deactivate ${p.name}? They are signed out everywhere.`,
                              )
                            )
                              deactivate.mutate(p.id);
                          }}
                        >
                          Deactivate
                        </button>
                      )}
                    </TableCell>
                  </TableRow>
                ))}
              </TableBody>
            </Table>
          </div>
        )}
      </QueryState>
      <h2 className="text-body font-semibold text-wk-ink-strong">Invitations</h2>
      <QueryState query={invitations} what="The invitations could not be loaded.">
        {(list) =>
          list.length === 0 ? (
            <Empty title="No invitations sent yet" />
          ) : (
            <ul className="wk-card divide-y divide-wk-line">
              {list.map((i) => (
                <li
                  key={i.id}
                  className="flex flex-wrap items-center justify-between gap-2 px-3 py-2"
                >
                  <span>
                    <span className="font-medium">{i.email}</span>{' '}
                    <span className="text-label text-wk-ink-soft">
                      {i.role} · {i.status}
                      {i.status === 'pending' && ` · expires ${formatDate(i.expiresAt, timeZone)}`}
                    </span>
                  </span>
                  {i.status === 'pending' && (
                    <button
                      type="button"
                      className="wk-button-quiet"
                      onClick={() => revoke.mutate(i.id)}
                    >
                      Withdraw
                    </button>
                  )}
                </li>
              ))}
            </ul>
          )
        }
      </QueryState>
    </section>
  );
}
