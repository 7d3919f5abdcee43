import { ALERT_LABELS } from '@wellkept/core';
import { useState, type FormEvent } from 'react';
import { FormError } from '../../../components/form-field';
import { QueryState } from '../../../components/states';
import { formErrors } from '../../../lib/form-errors';
import { type AlertSetting, useAlertSettings, usePutAlertSetting } from '../api/alert-settings';

/** Parameter names end in their unit (API values are SI); the label says it in words. */
const UNIT_SUFFIXES: [RegExp, string][] = [
  [/Seconds$/, 's'],
  [/VoltsPerCell$/, 'V per cell'],
  [/Fraction$/, 'share, 0–1'],
  [/Percent$/, '%'],
  [/Days$/, 'days'],
];

/** "holdSeconds" → "hold (s)", "floorFraction" → "floor (share, 0–1)". */
export function thresholdLabel(name: string): string {
  let unit = '';
  let stem = name;
  for (const [pattern, words] of UNIT_SUFFIXES) {
    if (pattern.test(stem)) {
      stem = stem.replace(pattern, '');
      unit = words;
      break;
    }
  }
  const text = stem.replace(/([a-z])([A-Z])/g, '$1 $2').toLowerCase();
  return unit ? `${text} (${unit})` : text;
}

/** Alert thresholds per site: on/off and each value, with the default beside it (admins edit). */
export function ThresholdsPanel(props: { siteId: string; canEdit: boolean }) {
  const settings = useAlertSettings(props.siteId);
  return (
    <section aria-label="Alert thresholds" className="wk-card space-y-3 p-4 lg:col-span-2">
      <h3 className="font-semibold text-wk-ink-strong">Alert thresholds</h3>
      <QueryState query={settings} what="The thresholds could not be loaded.">
        {(list) => (
          <div className="grid gap-3 md:grid-cols-2">
            {list.map((s) => (
              <ThresholdForm
                key={s.kind}
                siteId={props.siteId}
                setting={s}
                canEdit={props.canEdit}
              />
            ))}
          </div>
        )}
      </QueryState>
    </section>
  );
}

export function ThresholdForm(props: { siteId: string; setting: AlertSetting; canEdit: boolean }) {
  const { setting } = props;
  const put = usePutAlertSetting(props.siteId);
  const [enabled, setEnabled] = useState(setting.enabled);
  const [values, setValues] = useState<Record<string, string>>(() =>
    Object.fromEntries(Object.entries(setting.params).map(([k, v]) => [k, String(v)])),
  );
  const [local, setLocal] = useState<Record<string, string>>({});
  const server = formErrors(put.error);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const params: Record<string, number> = {};
    const problems: Record<string, string> = {};
    for (const [k, v] of Object.entries(values)) {
      if (v.trim() === '') continue;
      const n = Number(v);
      if (!Number.isFinite(n) || n < 0) problems[k] = 'must be a number, zero or more';
      else params[k] = n;
    }
    setLocal(problems);
    if (Object.keys(problems).length) return;
    put.mutate({ kind: setting.kind, enabled, params });
  };
  return (
    <form
      onSubmit={submit}
      noValidate
      className="rounded-lg border border-wk-line p-3"
      aria-label={ALERT_LABELS[setting.kind]}
    >
      <label className="flex items-center gap-2 font-medium text-wk-ink">
        <input
          type="checkbox"
          checked={enabled}
          disabled={!props.canEdit}
          onChange={(e) => setEnabled(e.target.checked)}
        />
        {ALERT_LABELS[setting.kind]}
      </label>
      <div className="mt-2 space-y-1.5">
        {Object.entries(setting.defaults).map(([name, def]) => (
          <label
            key={name}
            className="grid grid-cols-[1fr_7rem] items-center gap-2 text-label text-wk-ink"
          >
            <span>
              {thresholdLabel(name)} <span className="text-wk-ink-faint">(default {def})</span>
              {(local[name] ?? server.fields[`params.${name}`]) && (
                <span className="block font-medium text-wk-act">
                  {local[name] ?? server.fields[`params.${name}`]}
                </span>
              )}
            </span>
            <input
              className="wk-input py-1 font-mono"
              inputMode="decimal"
              placeholder={String(def)}
              disabled={!props.canEdit}
              value={values[name] ?? ''}
              onChange={(e) => setValues({ ...values, [name]: e.target.value })}
            />
          </label>
        ))}
      </div>
      <FormError message={server.message} />
      {props.canEdit && (
        <button type="submit" className="wk-button-quiet mt-2" disabled={put.isPending}>
          {put.isPending ? 'Saving…' : 'Save'}
        </button>
      )}
    </form>
  );
}
