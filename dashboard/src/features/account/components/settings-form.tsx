import { formatVolume, type UnitSystem } from '@wellkept/core';
import { useState, type FormEvent } from 'react';
import { FormError, FormField } from '../../../components/form-field';
import { formErrors } from '../../../lib/form-errors';
import { type AccountSettings, useUpdateAccount } from '../api/settings';

const SYSTEMS: { value: UnitSystem; label: string }[] = [
  { value: 'us', label: 'US customary' },
  { value: 'metric', label: 'Metric' },
];

function timeZones(current: string): string[] {
  const all =
    typeof Intl.supportedValuesOf === 'function' ? Intl.supportedValuesOf('timeZone') : [];
  return all.includes(current) ? all : [current, ...all];
}

/** Name, unit system, time zone and quiet hours. */
export function SettingsForm(props: { settings: AccountSettings }) {
  const update = useUpdateAccount();
  const [name, setName] = useState(props.settings.name);
  const [unitSystem, setUnitSystem] = useState<UnitSystem>(props.settings.unitSystem);
  const [timeZone, setTimeZone] = useState(props.settings.timeZone);
  const [quiet, setQuiet] = useState(props.settings.quietHours !== null);
  const [start, setStart] = useState(props.settings.quietHours?.start ?? '22:00');
  const [end, setEnd] = useState(props.settings.quietHours?.end ?? '07:00');
  const [local, setLocal] = useState<Record<string, string>>({});
  const server = formErrors(update.error);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const problems: Record<string, string> = {};
    if (!name.trim()) problems.name = 'Enter your name';
    if (quiet && start === end) problems['quietHours.end'] = 'Start and end must differ';
    setLocal(problems);
    if (Object.keys(problems).length) return;
    update.mutate({
      name: name.trim(),
      unitSystem,
      timeZone,
      quietHours: quiet ? { start, end } : null,
    });
  };
  return (
    <form onSubmit={submit} noValidate className="wk-card space-y-4 p-4" aria-label="Your settings">
      <h2 className="font-semibold text-wk-ink-strong">You</h2>
      <p className="text-label text-wk-ink-soft">Signed in as {props.settings.email}</p>
      <FormField
        label="Name"
        value={name}
        onChange={(e) => setName(e.target.value)}
        error={local.name ?? server.fields.name}
      />
      <fieldset>
        <legend className="text-label font-medium text-wk-ink">Units</legend>
        <div className="mt-1 flex flex-wrap gap-4">
          {SYSTEMS.map((s) => (
            <label key={s.value} className="flex items-center gap-2">
              <input
                type="radio"
                name="unitSystem"
                value={s.value}
                checked={unitSystem === s.value}
                onChange={() => setUnitSystem(s.value)}
              />
              {s.label}
              <span className="font-mono text-label text-wk-ink-soft">
                (e.g. {formatVolume(1, s.value, { fractionDigits: 0 }).text})
              </span>
            </label>
          ))}
        </div>
      </fieldset>
      <label className="block text-label font-medium text-wk-ink">
        Time zone
        <select
          className="wk-input mt-1"
          value={timeZone}
          onChange={(e) => setTimeZone(e.target.value)}
        >
          {timeZones(timeZone).map((tz) => (
            <option key={tz} value={tz}>
              {tz}
            </option>
          ))}
        </select>
        {server.fields.timeZone && (
          <span className="mt-1 block text-wk-act">{server.fields.timeZone}</span>
        )}
      </label>
      <fieldset className="space-y-2">
        <legend className="text-label font-medium text-wk-ink">Quiet hours</legend>
        <label className="flex items-center gap-2">
          <input type="checkbox" checked={quiet} onChange={(e) => setQuiet(e.target.checked)} />
          No alert e-mails during these hours (your time)
        </label>
        {quiet && (
          <div className="grid max-w-sm grid-cols-2 gap-3">
            <FormField
              label="From"
              type="time"
              value={start}
              onChange={(e) => setStart(e.target.value)}
              error={server.fields['quietHours.start']}
            />
            <FormField
              label="Until"
              type="time"
              value={end}
              onChange={(e) => setEnd(e.target.value)}
              error={local['quietHours.end'] ?? server.fields['quietHours.end']}
            />
          </div>
        )}
      </fieldset>
      <FormError message={server.message} />
      {update.isSuccess && (
        <p role="status" className="text-label text-wk-steady">
          Saved.
        </p>
      )}
      <button type="submit" className="wk-button" disabled={update.isPending}>
        {update.isPending ? 'Saving…' : 'Save settings'}
      </button>
    </form>
  );
}
