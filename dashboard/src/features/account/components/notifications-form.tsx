import { ALERT_KINDS, ALERT_LABELS, type AlertKind } from '@wellkept/core';
import { useState, type FormEvent } from 'react';
import { FormError } from '../../../components/form-field';
import { formErrors } from '../../../lib/form-errors';
import { type NotificationPreferences, useSaveNotifications } from '../api/settings';

/** Which alert e-mails this person gets: kinds, and on opening and/or clearing. */
export function NotificationsForm(props: { prefs: NotificationPreferences }) {
  const save = useSaveNotifications();
  const [kinds, setKinds] = useState<AlertKind[]>(props.prefs.kinds);
  const [onOpen, setOnOpen] = useState(props.prefs.onOpen);
  const [onClear, setOnClear] = useState(props.prefs.onClear);
  const server = formErrors(save.error);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    save.mutate({ kinds, siteIds: props.prefs.siteIds, onOpen, onClear });
  };
  return (
    <form onSubmit={submit} className="wk-card space-y-3 p-4" aria-label="Alert e-mails">
      <h2 className="font-semibold text-wk-ink-strong">Alert e-mails</h2>
      <fieldset>
        <legend className="text-label font-medium text-wk-ink">E-mail me about</legend>
        <div className="mt-1 grid gap-1 sm:grid-cols-2">
          {ALERT_KINDS.map((k) => (
            <label key={k} className="flex items-center gap-2">
              <input
                type="checkbox"
                checked={kinds.includes(k)}
                onChange={(e) =>
                  setKinds(e.target.checked ? [...kinds, k] : kinds.filter((x) => x !== k))
                }
              />
              {ALERT_LABELS[k]}
            </label>
          ))}
        </div>
      </fieldset>
      <fieldset className="flex flex-wrap gap-4">
        <legend className="text-label font-medium text-wk-ink">When</legend>
        <label className="flex items-center gap-2">
          <input type="checkbox" checked={onOpen} onChange={(e) => setOnOpen(e.target.checked)} />{' '}
          an alert opens
        </label>
        <label className="flex items-center gap-2">
          <input type="checkbox" checked={onClear} onChange={(e) => setOnClear(e.target.checked)} />{' '}
          it clears
        </label>
      </fieldset>
      <FormError message={server.message ?? server.fields.kinds} />
      {save.isSuccess && (
        <p role="status" className="text-label text-wk-steady">
          Saved.
        </p>
      )}
      <button type="submit" className="wk-button" disabled={save.isPending}>
        {save.isPending ? 'Saving…' : 'Save e-mail choices'}
      </button>
    </form>
  );
}
