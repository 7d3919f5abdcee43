import { useState, type FormEvent } from 'react';
import { FormError, FormField } from '../../../components/form-field';
import { SafetyCaution } from '../../../components/safety-caution';
import { formErrors } from '../../../lib/form-errors';
import type { BatteryBank } from '../api/get-equipment';
import { type BatteryBankBody, usePutEquipment } from '../api/put-equipment';

const CHEMISTRIES = [
  { value: 'flooded', label: 'Flooded lead-acid' },
  { value: 'agm', label: 'AGM' },
  { value: 'gel', label: 'Gel' },
  { value: 'lifepo4', label: 'Lithium iron phosphate (LiFePO4)' },
] as const;

/** The site's battery bank (admins). Volts and amp-hours are the same in both unit systems. */
export function BatteryBankForm(props: {
  siteId: string;
  bank: BatteryBank | null;
  onSaved?: () => void;
}) {
  const put = usePutEquipment<BatteryBankBody>(props.siteId, 'battery-bank');
  const [chemistry, setChemistry] = useState<BatteryBankBody['chemistry']>(
    props.bank?.chemistry ?? 'agm',
  );
  const [volts, setVolts] = useState(String(props.bank?.nominalVoltageV ?? 24));
  const [capacity, setCapacity] = useState(props.bank ? String(props.bank.capacityAh) : '');
  const [strings, setStrings] = useState(String(props.bank?.strings ?? 1));
  const [local, setLocal] = useState<Record<string, string>>({});
  const server = formErrors(put.error);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const problems: Record<string, string> = {};
    const ah = Number(capacity);
    const n = Number(strings);
    if (!capacity || !(ah > 0)) problems.capacityAh = 'Capacity must be greater than zero';
    if (!Number.isInteger(n) || n < 1 || n > 16) problems.strings = 'Between 1 and 16 strings';
    setLocal(problems);
    if (Object.keys(problems).length) return;
    put.mutate(
      { chemistry, nominalVoltageV: Number(volts), capacityAh: ah, strings: n },
      { onSuccess: () => props.onSaved?.() },
    );
  };
  return (
    <form onSubmit={submit} noValidate className="space-y-3" aria-label="Battery bank">
      <SafetyCaution topics={['battery']} />
      <div className="grid gap-3 sm:grid-cols-2">
        <label className="block text-label font-medium text-wk-ink">
          Chemistry
          <select
            className="wk-input mt-1"
            value={chemistry}
            onChange={(e) => setChemistry(e.target.value as BatteryBankBody['chemistry'])}
          >
            {CHEMISTRIES.map((c) => (
              <option key={c.value} value={c.value}>
                {c.label}
              </option>
            ))}
          </select>
        </label>
        <label className="block text-label font-medium text-wk-ink">
          Nominal voltage
          <select
            className="wk-input mt-1"
            value={volts}
            onChange={(e) => setVolts(e.target.value)}
          >
            {[12, 24, 36, 48].map((v) => (
              <option key={v} value={v}>
                {v} V
              </option>
            ))}
          </select>
        </label>
        <FormField
          label="Capacity"
          unit="Ah"
          inputMode="decimal"
          value={capacity}
          onChange={(e) => setCapacity(e.target.value)}
          error={local.capacityAh ?? server.fields.capacityAh}
          hint="Rated capacity (20-hour rate for lead-acid)."
        />
        <FormField
          label="Strings in parallel"
          inputMode="numeric"
          value={strings}
          onChange={(e) => setStrings(e.target.value)}
          error={local.strings ?? server.fields.strings}
          hint="Default 1."
        />
      </div>
      <FormError message={server.message} />
      <button type="submit" className="wk-button" disabled={put.isPending}>
        {put.isPending ? 'Saving…' : 'Save battery bank'}
      </button>
      {put.isSuccess && (
        <p role="status" className="text-label text-wk-steady">
          Saved.
        </p>
      )}
    </form>
  );
}
