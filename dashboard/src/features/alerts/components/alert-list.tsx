import { ALERT_LABELS } from '@wellkept/core';
import { useState } from 'react';
import { Link } from 'react-router';
import { FormError } from '../../../components/form-field';
import { SafetyCaution } from '../../../components/safety-caution';
import { Empty, QueryState } from '../../../components/states';
import { formErrors } from '../../../lib/form-errors';
import { usePersonSettings } from '../../../lib/person-settings';
import { formatAgo, formatDateTime } from '../../../lib/time-format';
import { useAcknowledgeAlert } from '../api/acknowledge-alert';
import { type Alert, type AlertStatusFilter, useAlerts } from '../api/get-alerts';
import { OWNER_WORDS } from './alert-words';

const STATUS_WORDS: Record<Alert['status'], string> = {
  open: 'Open',
  acknowledged: 'Acknowledged',
  cleared: 'Cleared',
};
const FILTERS: { value: AlertStatusFilter; label: string }[] = [
  { value: 'active', label: 'Open and acknowledged' },
  { value: 'open', label: 'Open only' },
  { value: 'cleared', label: 'Cleared' },
  { value: 'all', label: 'All' },
];

/**
 * Alerts for one site or across sites, with acknowledge-with-a-note. `plain` words them for
 * owners (what it means, that the installer has been told).
 */
export function AlertList(props: {
  siteId?: string;
  plain?: boolean;
  canAcknowledge: boolean;
  siteHref?: (siteId: string) => string;
}) {
  const [status, setStatus] = useState<AlertStatusFilter>('active');
  const alerts = useAlerts({ siteId: props.siteId, status });
  return (
    <section aria-label="Alerts" className="space-y-3">
      <label className="flex items-center gap-2 text-label text-wk-ink-soft">
        Show
        <select
          className="wk-input w-auto"
          value={status}
          onChange={(e) => setStatus(e.target.value as AlertStatusFilter)}
        >
          {FILTERS.map((f) => (
            <option key={f.value} value={f.value}>
              {f.label}
            </option>
          ))}
        </select>
      </label>
      <QueryState query={alerts} what="The alerts could not be loaded.">
        {(list) =>
          list.length === 0 ? (
            <Empty title={status === 'active' ? 'Nothing needs attention' : 'No alerts here'}>
              {status === 'active' ? 'Open alerts show up here the moment a rule trips.' : null}
            </Empty>
          ) : (
            <ul className="space-y-2">
              {list.map((a) => (
                <AlertItem key={a.id} alert={a} {...props} />
              ))}
            </ul>
          )
        }
      </QueryState>
    </section>
  );
}

/** One alert; exported for its tests. */
export function AlertItem(props: {
  alert: Alert;
  plain?: boolean;
  canAcknowledge: boolean;
  siteId?: string;
  siteHref?: (siteId: string) => string;
}) {
  const { alert } = props;
  const { timeZone } = usePersonSettings();
  const [note, setNote] = useState('');
  const [open, setOpen] = useState(false);
  const ack = useAcknowledgeAlert();
  const severityText = alert.severity === 'act' ? 'Needs action' : 'Worth watching';
  const wiringOrBattery = ['low_charge', 'overnight_sag', 'no_charge'].includes(alert.kind);
  const wellWork = ['dry_run', 'short_cycling', 'float_stuck'].includes(alert.kind);
  return (
    <li className="wk-card p-3" data-alert-id={alert.id} data-status={alert.status}>
      <div className="flex flex-wrap items-start justify-between gap-2">
        <div className="min-w-0">
          <p className="font-semibold text-wk-ink-strong">
            {ALERT_LABELS[alert.kind]}
            {alert.subject && (
              <span className="font-normal text-wk-ink-soft"> · {alert.subject}</span>
            )}
          </p>
          {!props.siteId && (
            <p className="text-label">
              {props.siteHref ? (
                <Link className="wk-link" to={props.siteHref(alert.siteId)}>
                  {alert.siteName}
                </Link>
              ) : (
                alert.siteName
              )}
            </p>
          )}
        </div>
        <p className="text-label text-wk-ink-soft">
          <span
            className={
              alert.severity === 'act' ? 'font-semibold text-wk-act' : 'font-semibold text-wk-watch'
            }
          >
            {severityText}
          </span>{' '}
          · {STATUS_WORDS[alert.status]} · opened{' '}
          <time dateTime={alert.openedAt} title={formatDateTime(alert.openedAt, timeZone)}>
            {formatAgo(alert.openedAt)}
          </time>
        </p>
      </div>
      <p className="mt-1 text-wk-ink">{props.plain ? OWNER_WORDS[alert.kind] : alert.summary}</p>
      {props.plain && alert.status !== 'cleared' && (
        <p className="mt-1 text-label text-wk-ink-soft">Your installer has been told about this.</p>
      )}
      {alert.status === 'acknowledged' && (
        <p className="mt-1 text-label text-wk-ink-soft">
          Acknowledged {alert.acknowledgedAt ? formatDateTime(alert.acknowledgedAt, timeZone) : ''}
          {alert.acknowledgedBy ? ` by ${alert.acknowledgedBy}` : ''}
          {alert.acknowledgeNote ? `: “${alert.acknowledgeNote}”` : ''}
        </p>
      )}
      {alert.status === 'cleared' && alert.clearedAt && (
        <p className="mt-1 text-label text-wk-ink-soft">
          Cleared {formatDateTime(alert.clearedAt, timeZone)}
        </p>
      )}
      {/* Owners are not sent to the equipment at all: their page carries the one caution
          (leave enclosures closed) in its summary, so repeating it per alert only adds noise. */}
      {!props.plain && alert.status !== 'cleared' && (wiringOrBattery || wellWork) && (
        <div className="mt-2">
          <SafetyCaution topics={wiringOrBattery ? ['battery', 'wiring'] : ['well', 'wiring']} />
        </div>
      )}
      {props.canAcknowledge && alert.status === 'open' && (
        <div className="mt-2">
          {!open ? (
            <button type="button" className="wk-button-quiet" onClick={() => setOpen(true)}>
              Acknowledge
            </button>
          ) : (
            <form
              className="flex flex-col gap-2 sm:flex-row sm:items-end"
              onSubmit={(e) => {
                e.preventDefault();
                ack.mutate({ siteId: alert.siteId, alertId: alert.id, note: note.trim() });
              }}
            >
              <label className="flex-1 text-label font-medium text-wk-ink">
                Note for the team (optional)
                <input
                  className="wk-input mt-1"
                  value={note}
                  maxLength={2000}
                  onChange={(e) => setNote(e.target.value)}
                />
              </label>
              <button type="submit" className="wk-button" disabled={ack.isPending}>
                {ack.isPending ? 'Saving…' : 'Acknowledge'}
              </button>
            </form>
          )}
          <FormError message={formErrors(ack.error).message ?? formErrors(ack.error).fields.note} />
        </div>
      )}
    </li>
  );
}
